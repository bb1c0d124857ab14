import type { Sequelize } from 'sequelize';

type Callback = (err: Error | null, result?: unknown) => void;
type PgClient = { query: (...args: unknown[]) => unknown };
const queued = Symbol('queries one at a time');

/**
 * Sends a connection's queries one after another: the next leaves only once the one before has answered. Code
 * sharing one transaction's connection may ask for several things at once (Promise.all over reads that all pass
 * the transaction); pg 8 queues such queries itself but warns that it will stop doing so (pg@9), and printed that
 * warning at every start. The order and the answers are those pg's own queue gave: first asked, first sent.
 * Works for both of pg's call forms: with a callback (Sequelize's), and returning a promise (prepared-read.ts).
 */
function queueQueries(client: PgClient & { [queued]?: true }): void {
  if (client[queued]) return;
  client[queued] = true;
  const query = client.query.bind(client);
  let idle: Promise<void> = Promise.resolve();
  client.query = (...args: unknown[]) => {
    let release!: () => void;
    const previous = idle;
    idle = new Promise<void>((resolve) => (release = resolve));
    const callback = typeof args.at(-1) === 'function' ? (args.at(-1) as Callback) : null;
    if (callback) {
      void previous.then(() => {
        try {
          query(...args.slice(0, -1), (err: Error | null, result?: unknown) => {
            release();
            callback(err, result);
          });
        } catch (err) {
          release();
          callback(err as Error);
        }
      });
      return undefined;
    }
    return previous.then(() => query(...args) as Promise<unknown>).finally(release);
  };
}

/** Every connection the pool hands out sends its queries one at a time (queueQueries). */
export function tunePostgresConnections(sequelize: Sequelize): void {
  const manager = sequelize.connectionManager as unknown as { getConnection: (options?: object) => Promise<PgClient> };
  const open = manager.getConnection.bind(manager);
  manager.getConnection = async (options?: object) => {
    const connection = await open(options);
    queueQueries(connection);
    return connection;
  };
}
