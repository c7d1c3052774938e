import net from "node:net";

/** A TCP port on 127.0.0.1 that nothing listens on right now (the kernel picks it). */
export async function findFreePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.on("error", reject);
    server.listen({ host: "127.0.0.1", port: 0 }, () => {
      const address = server.address();
      server.close(() => {
        if (address && typeof address === "object") resolve(address.port);
        else reject(new Error("could not read the port the kernel assigned"));
      });
    });
  });
}

/** Whether something accepts connections on 127.0.0.1:port. */
export async function isPortInUse(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = net.connect({ host: "127.0.0.1", port });
    socket.once("connect", () => {
      socket.destroy();
      resolve(true);
    });
    socket.once("error", () => resolve(false));
  });
}

/** Fails with a line naming the service and the variable that moves it when its port is taken. */
export async function assertPortFree(port: number, service: string, variable: string) {
  if (await isPortInUse(port)) {
    throw new Error(
      `${service} cannot use port ${port}: something already listens there. ` +
        `Stop it, or choose another port with ${variable}=<port>.`,
    );
  }
}

/** Reads a port number from the environment, or the default. */
export function readPort(variable: string, fallback: number): number {
  const raw = process.env[variable];
  if (raw === undefined || raw === "") return fallback;
  const port = Number(raw);
  if (!Number.isInteger(port) || port < 1 || port > 65535) {
    throw new Error(`${variable} must be a port number between 1 and 65535, got "${raw}"`);
  }
  return port;
}
