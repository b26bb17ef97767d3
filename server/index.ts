/** The only file that listens. */
import { createApp } from './app';
import { connect } from './db';
import { loadEnv } from './env';

export async function startServer(envSource: NodeJS.ProcessEnv = process.env) {
  const env = loadEnv(envSource);
  const db = connect(env.DATABASE_URL);
  const { app, close } = createApp({ env, db });
  const server = await new Promise<import('node:http').Server>((resolve, reject) => {
    const s = app.listen(env.PORT, env.HOST, () => resolve(s));
    s.on('error', reject);
  });
  const address = server.address();
  const port = typeof address === 'object' && address ? address.port : env.PORT;
  return {
    url: `http://${env.HOST}:${port}`,
    async stop() {
      const closed = new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeIdleConnections();
      await closed;
      await close();
      await db.close();
    },
  };
}

if (require.main === module) {
  startServer()
    .then(({ url, stop }) => {
      console.log(`Trimout API listening on ${url}`);
      const shutdown = () => {
        stop().then(
          () => process.exit(0),
          () => process.exit(1),
        );
      };
      process.once('SIGINT', shutdown);
      process.once('SIGTERM', shutdown);
    })
    .catch((err: unknown) => {
      console.error(err instanceof Error ? err.message : err);
      process.exit(1);
    });
}
