import net from "node:net";

/**
 * A TCP port on 127.0.0.1 that was free a moment ago (the system picks it: listen on port 0, read
 * it, close). For starting a test or benchmark server; another process may still take it first.
 */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
    server.on("error", reject);
  });
}
