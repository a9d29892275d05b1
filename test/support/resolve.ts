import net from 'node:net';

export interface ServiceUrls {
  /** A URL of the server's maintenance database, used to create and drop per-file databases. */
  databaseUrl: string;
  redisUrl: string;
}

const LOCAL_PG = 'postgres://postgres@127.0.0.1:5432/postgres';
const LOCAL_REDIS = 'redis://127.0.0.1:6379';

function reachable(url: string, fallbackPort: number): Promise<boolean> {
  const u = new URL(url);
  return new Promise((resolve) => {
    const socket = net.connect({ host: u.hostname, port: Number(u.port || fallbackPort) });
    const done = (ok: boolean) => {
      socket.destroy();
      resolve(ok);
    };
    socket.setTimeout(1500, () => done(false));
    socket.once('connect', () => done(true));
    socket.once('error', () => done(false));
  });
}

/**
 * Real services for integration tests, in this order: DATABASE_URL / REDIS_URL; else PostgreSQL and
 * Redis on 127.0.0.1 (5432, user postgres; 6379); else containers through testcontainers when a Docker
 * engine exists; else an error that says how to provide them.
 */
export async function resolveServices(): Promise<{ urls: ServiceUrls; stop: () => Promise<void> }> {
  const envDb = process.env.DATABASE_URL;
  const envRedis = process.env.REDIS_URL;
  let databaseUrl = envDb ?? ((await reachable(LOCAL_PG, 5432)) ? LOCAL_PG : undefined);
  let redisUrl = envRedis ?? ((await reachable(LOCAL_REDIS, 6379)) ? LOCAL_REDIS : undefined);
  const stops: Array<() => Promise<unknown>> = [];
  if (!databaseUrl || !redisUrl) {
    try {
      const tc = await import('testcontainers');
      if (!databaseUrl) {
        const { PostgreSqlContainer } = await import('@testcontainers/postgresql');
        const c = await new PostgreSqlContainer('postgres:16-alpine').withUsername('postgres').withPassword('postgres').start();
        stops.push(() => c.stop());
        databaseUrl = c.getConnectionUri();
      }
      if (!redisUrl) {
        const c = await new tc.GenericContainer('redis:7-alpine').withExposedPorts(6379).start();
        stops.push(() => c.stop());
        redisUrl = `redis://${c.getHost()}:${c.getMappedPort(6379)}`;
      }
    } catch (err) {
      throw new Error(
        'integration tests need PostgreSQL and Redis: set DATABASE_URL and REDIS_URL, or run them on ' +
          '127.0.0.1:5432 (user postgres, trust auth) and 127.0.0.1:6379, or provide a Docker engine for testcontainers ' +
          `(${err instanceof Error ? err.message.split('\n')[0] : String(err)})`,
      );
    }
  }
  return { urls: { databaseUrl: databaseUrl!, redisUrl: redisUrl! }, stop: async () => void (await Promise.all(stops.map((s) => s()))) };
}
