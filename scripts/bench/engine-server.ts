/**
 * The app on an ephemeral 127.0.0.1 port, in its own process so the load generator does not
 * share its event loop. Started by scripts/bench/engine.ts with the database URL as the only
 * argument; reports `{ port }` over IPC and exits when the parent disconnects or sends 'stop'.
 */
import type { AddressInfo } from 'node:net';
import { createDatabase } from '../../db/client';
import { createApp } from '../../server/app';
import { createRateLimits } from '../../server/middleware/rate-limit';

const url = process.argv[2];
if (!url || !process.send) {
  console.error('start me from scripts/bench/engine.ts');
  process.exit(2);
}
const database = createDatabase(url, { max: 10 });
const app = createApp({ db: database.db, rateLimits: createRateLimits({ perIp: 1e6, perAccount: 1e6, windowSeconds: 60 }) });
const server = app.listen(0, '127.0.0.1', () => {
  process.send!({ port: (server.address() as AddressInfo).port });
});
const stop = () => {
  server.close(() => {
    void database.close().finally(() => process.exit(0));
  });
  server.closeAllConnections();
};
process.on('message', (m) => m === 'stop' && stop());
process.on('disconnect', stop);
