/**
 * A loopback port nobody listens on, chosen by the operating system. Tests that start servers take
 * one instead of a fixed number, so two test runs on one machine (or a developer's server) do not
 * collide. The port is released before the caller binds it; the kernel does not hand the same
 * ephemeral port to the next listen(0) right away, so the window is small.
 */
import net from "node:net";

export async function freePort(avoid: number[] = []): Promise<number> {
  for (;;) {
    const port = await listenOnce();
    if (!avoid.includes(port)) return port;
  }
}

function listenOnce(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.unref();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}
