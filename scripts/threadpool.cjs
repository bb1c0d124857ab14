// Preloaded by `npm start` (node --require) before anything touches libuv's thread pool, which is sized on its
// first use (the ES module loader uses it to read the entry file, so the server's own code is too late). SQLite
// statements, file reads and zlib run on that pool, 4 threads by default; with reads and a write transaction in
// flight at once, a writer's statements queued there behind reads. An operator's own UV_THREADPOOL_SIZE wins.
process.env.UV_THREADPOOL_SIZE ??= '16';
