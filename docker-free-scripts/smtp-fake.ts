// Local SMTP fake: accepts every message on loopback, keeps it in a JSON file, and serves the
// messages newest first at GET /messages on its own HTTP port (read by the app's dev inbox).
import crypto from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';

const smtpPort = Number(process.env.SMTP_FAKE_PORT ?? 54325);
const httpPort = Number(process.env.SMTP_FAKE_HTTP_PORT ?? 54331);
const dir = process.env.SMTP_FAKE_DIR ?? '.data/mail';
fs.mkdirSync(dir, { recursive: true });
const file = path.join(dir, 'messages.json');

type Stored = { id: string; to: string; subject: string; text: string; date: string };
let messages: Stored[] = fs.existsSync(file) ? JSON.parse(fs.readFileSync(file, 'utf8')) : [];
const save = () => fs.writeFileSync(file, JSON.stringify(messages.slice(0, 1000)));

const smtp = new SMTPServer({
  authOptional: true,
  disabledCommands: ['STARTTLS'],
  logger: false,
  onData(stream, _session, callback) {
    simpleParser(stream)
      .then((mail) => {
        const to = Array.isArray(mail.to) ? mail.to.map((a) => a.text).join(', ') : (mail.to?.text ?? '');
        messages.unshift({
          id: crypto.randomUUID(),
          to,
          subject: mail.subject ?? '',
          text: mail.text ?? '',
          date: new Date().toISOString(),
        });
        save();
        callback();
      })
      .catch((err) => callback(err));
  },
});
smtp.listen(smtpPort, '127.0.0.1', () => console.log(`[smtp-fake] SMTP on 127.0.0.1:${smtpPort}`));

const web = http.createServer((req, res) => {
  if (req.url === '/messages' && req.method === 'GET') {
    res.writeHead(200, { 'content-type': 'application/json' });
    res.end(JSON.stringify({ messages }));
  } else if (req.url === '/messages' && req.method === 'DELETE') {
    messages = [];
    save();
    res.writeHead(204).end();
  } else {
    res.writeHead(404).end();
  }
});
web.listen(httpPort, '127.0.0.1', () => console.log(`[smtp-fake] inbox JSON on http://127.0.0.1:${httpPort}/messages`));

const stop = () => {
  smtp.close(() => undefined);
  web.close();
  setTimeout(() => process.exit(0), 200);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
