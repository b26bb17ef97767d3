/**
 * Database wiring. Nothing connects on import: callers create a Sequelize instance,
 * run the migrations through umzug, and close it when done.
 */
import path from 'node:path';
import { Sequelize, type QueryInterface } from 'sequelize';
import { Umzug, SequelizeStorage } from 'umzug';
import { initModels, type Models } from './models';

interface MigrationModule {
  up(args: { context: QueryInterface }): Promise<void>;
  down(args: { context: QueryInterface }): Promise<void>;
}

export interface Database {
  sequelize: Sequelize;
  models: Models;
  close(): Promise<void>;
}

/**
 * Settings of every connection, after any the environment gives (PGOPTIONS). JIT compilation off:
 * the app's statements are short, and PostgreSQL compiled the larger ones (readiness, the board's
 * waiting fixes, scorecards) on every run, which cost more than it saved (`npm run bench`: the
 * board's SQL 93 -> 61 ms, the database's capacity for the mix 101 -> 139 requests/s).
 */
export function sessionOptions(env: NodeJS.ProcessEnv = process.env): string {
  return [env.PGOPTIONS?.trim(), '-c jit=off'].filter(Boolean).join(' ');
}

export function connect(databaseUrl: string, options: { poolMax?: number; logging?: boolean } = {}): Database {
  const sequelize = new Sequelize(databaseUrl, {
    dialect: 'postgres',
    logging: options.logging ? (sql) => console.log(sql) : false,
    pool: { max: options.poolMax ?? 10, min: 0, idle: 10_000, acquire: 10_000 },
    define: { underscored: true },
    dialectOptions: { application_name: 'trimout', connectionTimeoutMillis: 5_000, options: sessionOptions() },
  });
  const models = initModels(sequelize);
  return { sequelize, models, close: () => sequelize.close() };
}

export function migrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: {
      glob: ['migrations/*.{ts,js}', { cwd: __dirname, ignore: ['**/*.d.ts'] }],
      // Names are stored without the extension, so tsx, jest and compiled JS agree on what ran.
      resolve: ({ name, path: file, context }) => {
        const bare = name.replace(/\.(ts|js)$/, '');
        return {
          name: bare,
          // require, not import(): the server runs as CommonJS under tsx and under jest alike.
          // eslint-disable-next-line @typescript-eslint/no-require-imports
          up: async () => (require(file!) as MigrationModule).up({ context }),
          // eslint-disable-next-line @typescript-eslint/no-require-imports
          down: async () => (require(file!) as MigrationModule).down({ context }),
        };
      },
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

export async function migrate(sequelize: Sequelize): Promise<string[]> {
  const done = await migrator(sequelize).up();
  return done.map((m) => m.name);
}

export const migrationsDir = path.join(__dirname, 'migrations');
