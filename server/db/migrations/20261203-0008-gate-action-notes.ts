import type { QueryInterface } from 'sequelize';

// The note a gate action's owner (or a lead) leaves when moving it, for example what was done
// when marking it done. Actions are rows of their own beside the decided review, so this column
// and its updates never touch gate_reviews and its immutability trigger.
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    ALTER TABLE gate_actions ADD COLUMN note text NOT NULL DEFAULT '' CHECK (char_length(note) <= 2000);
  `);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE gate_actions DROP COLUMN IF EXISTS note;`);
}
