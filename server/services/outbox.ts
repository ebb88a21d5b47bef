import { Op, type Transaction } from 'sequelize';
import { OutboxMessage } from '../db/models';
import type { Deps } from '../deps';

/**
 * Mail is written to the outbox in the same transaction as the change that caused it, then
 * delivered by `dispatchOutbox`; a message that fails is retried with a growing delay, so an
 * SMTP outage delays e-mail but loses none.
 */
export async function enqueueMail(
  message: { to: string; subject: string; text: string; kind: string },
  transaction?: Transaction,
) {
  await OutboxMessage.create(
    { toAddress: message.to, subject: message.subject, text: message.text, kind: message.kind },
    { transaction },
  );
}

const MAX_ATTEMPTS = 20;

export async function dispatchOutbox(deps: Deps, limit = 20): Promise<{ sent: number; failed: number }> {
  let sent = 0;
  let failed = 0;
  await deps.sequelize.transaction(async (transaction) => {
    const due = await OutboxMessage.findAll({
      where: { status: 'pending', nextAttemptAt: { [Op.lte]: new Date() } },
      order: [['createdAt', 'ASC']],
      limit,
      lock: transaction.LOCK.UPDATE,
      skipLocked: true,
      transaction,
    });
    for (const message of due) {
      try {
        await deps.mailer.send({ to: message.toAddress, subject: message.subject, text: message.text });
        message.status = 'sent';
        message.sentAt = new Date();
        sent += 1;
      } catch (err) {
        failed += 1;
        message.attempts += 1;
        message.lastError = String((err as Error).message).slice(0, 500);
        // 5 s, 10 s, 20 s ... capped at 10 minutes.
        const delay = Math.min(600_000, 5_000 * 2 ** Math.min(message.attempts - 1, 7));
        message.nextAttemptAt = new Date(Date.now() + delay);
        if (message.attempts >= MAX_ATTEMPTS) message.status = 'failed';
      }
      await message.save({ transaction });
    }
  });
  return { sent, failed };
}

/** Runs the dispatcher every `intervalMs`; returns a stop function. */
export function startOutboxLoop(deps: Deps, intervalMs = 2_000): () => void {
  let running = false;
  const timer = setInterval(async () => {
    if (running) return;
    running = true;
    try {
      await dispatchOutbox(deps);
    } catch {
      // The database may be down; the next tick tries again.
    } finally {
      running = false;
    }
  }, intervalMs);
  timer.unref();
  return () => clearInterval(timer);
}
