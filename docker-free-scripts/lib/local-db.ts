import { DEFAULT_PGPORT } from '../../server/config/env';
import { clusterDirFor, startCluster, type Cluster } from './postgres';
import { ROOT } from './services';

/**
 * The database a maintenance command works on: DATABASE_URL when set, else the local cluster of
 * `npm start` (started for the command if it is not running, and stopped again afterwards).
 */
export async function withDatabase<T>(work: (databaseUrl: string) => Promise<T> | T): Promise<T> {
  if (process.env.DATABASE_URL) return work(process.env.DATABASE_URL);
  let cluster: Cluster | undefined;
  try {
    cluster = await startCluster({
      dataDir: clusterDirFor(ROOT, 'pg'),
      port: Number(process.env.PGPORT ?? DEFAULT_PGPORT),
      durable: true,
    });
    return await work(cluster.url('proofyard'));
  } finally {
    if (cluster?.startedHere) cluster.stop();
  }
}
