// The app's HTTP server: Next.js behind a thin wrapper that tells the app who is really calling.
//
// Next passes a client-written X-Forwarded-For through untouched, so the app could not tell the
// address it sees from one a client made up. This wrapper writes the connection's own address into
// a header of its own (replacing whatever a client sent under that name) and tells the app which
// address it listens on; lib/http/client-address.ts decides from these whether to trust a proxy.
//
// Usage: node scripts/serve-app.mjs [--dev] [-H host] [-p port]
import { createServer } from "node:http";
import path from "node:path";
import { fileURLToPath } from "node:url";
import next from "next";

const PEER_HEADER = "x-partita-peer-address";

function option(flag, fallback) {
  const index = process.argv.indexOf(flag);
  return index === -1 ? fallback : process.argv[index + 1];
}

const dev = process.argv.includes("--dev");
const hostname = option("-H", "127.0.0.1");
const port = Number(option("-p", "3000"));
const dir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

process.env.PARTITA_LISTEN_HOST = hostname;
if (!dev) process.env.NODE_ENV = "production";

const app = next({ dev, dir, hostname, port });
const handle = app.getRequestHandler();
await app.prepare();

createServer((request, response) => {
  request.headers[PEER_HEADER] = request.socket.remoteAddress ?? "";
  void handle(request, response);
}).listen(port, hostname, () => {
  console.log(`Partita is listening on http://${hostname}:${port}`);
});
