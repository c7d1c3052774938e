import net from "node:net";

export interface FrozenServer {
  port: number;
  /** Connections accepted so far: proves a call reached the server rather than failing early. */
  readonly accepted: number;
  close(): Promise<void>;
}

/**
 * A TCP server on 127.0.0.1 that accepts every connection and never sends a byte: what a hung
 * S3 or SMTP server looks like to a client (the connection succeeds, no answer ever comes).
 */
export async function startFrozenServer(): Promise<FrozenServer> {
  const sockets = new Set<net.Socket>();
  let accepted = 0;
  const server = net.createServer((socket) => {
    accepted += 1;
    sockets.add(socket);
    socket.on("close", () => sockets.delete(socket));
    socket.on("error", () => undefined);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as net.AddressInfo;
  return {
    port,
    get accepted() {
      return accepted;
    },
    close: () =>
      new Promise<void>((resolve) => {
        for (const socket of sockets) socket.destroy();
        server.close(() => resolve());
      }),
  };
}
