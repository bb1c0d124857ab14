// Several application processes behind one port (node:cluster: the primary accepts connections and hands them
// to its workers in turn), as a laboratory running more than one application server on PostgreSQL would.
//   node bench/support/two-processes.mjs <workers> <node options and server entry...>
// Prints "all <n> listening" once every worker listens on PORT; SIGTERM stops the workers, then the primary.
import cluster from 'node:cluster';

const [count, ...command] = process.argv.slice(2);
const workers = Number(count);
if (!Number.isInteger(workers) || workers < 1 || command.length === 0) {
  console.error('usage: node bench/support/two-processes.mjs <workers> <node options...> <server entry>');
  process.exit(2);
}
cluster.schedulingPolicy = cluster.SCHED_RR;
cluster.setupPrimary({ exec: command.at(-1), execArgv: command.slice(0, -1) });
let listening = 0;
// Only the HTTP port counts: a worker's local mail server listens too (LOCAL_SMTP_PORT), usually before the
// HTTP server, which waits for the start-up steps.
cluster.on('listening', (_worker, address) => {
  if (address.port === Number(process.env.PORT) && ++listening === workers) console.log(`all ${workers} listening`);
});
cluster.on('exit', (worker, code, signal) => {
  if (!stopping) {
    console.error(`worker ${worker.process.pid} ended (${signal ?? code}); stopping`);
    process.exit(1);
  }
});
let stopping = false;
process.on('SIGTERM', () => {
  stopping = true;
  const alive = Object.values(cluster.workers ?? {});
  let left = alive.length;
  if (left === 0) process.exit(0);
  for (const w of alive) {
    w.once('exit', () => --left === 0 && process.exit(0));
    w.process.kill('SIGTERM');
  }
  setTimeout(() => process.exit(0), 10_000).unref();
});
for (let i = 0; i < workers; i++) cluster.fork();
