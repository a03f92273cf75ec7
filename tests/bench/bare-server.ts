/** The benchmarks' reference, run as its own process: the cheapest JSON answer Express can give (and a health route to wait for). */
import express from 'express';

const app = express();
app.get(['/bare', '/api/health'], (_req, res) => {
  res.json({ ok: true });
});
const server = app.listen(Number(process.env.PORT), '127.0.0.1');
process.once('SIGTERM', () => {
  server.close();
  server.closeAllConnections();
});
