import type { QueryInterface } from 'sequelize';

/** The session store's table, in the shape connect-pg-simple expects (its table.sql). */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`
    CREATE TABLE sessions (
      sid varchar NOT NULL COLLATE "default" PRIMARY KEY,
      sess json NOT NULL,
      expire timestamp(6) NOT NULL
    )`);
  await qi.sequelize.query(`CREATE INDEX sessions_expire ON sessions (expire)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('sessions');
}
