// The floor for the request-path benchmark: a bare Express app whose one handler answers a small JSON body to
// any request without reading it. Plain JavaScript, so it starts without a TypeScript loader.
import express from 'express';

const app = express();
app.all('/{*splat}', (_req, res) => {
  res.json({ ok: true });
});
const server = app.listen(Number(process.env.PORT), () => console.log('floor ready'));
process.on('SIGTERM', () => server.close(() => process.exit(0)));
