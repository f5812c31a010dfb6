import net from "node:net";

/**
 * A TCP relay on loopback in front of PostgreSQL, for tests of what an app instance does while
 * the database is away: `down()` drops every open connection and refuses new ones (each is closed
 * at once), `up()` relays again. The real database stays up for everyone else.
 */
export interface TcpProxy {
  port: number;
  url: (databaseUrl: string) => string;
  down: () => void;
  up: () => void;
  close: () => Promise<void>;
}

export async function startTcpProxy(target: { host: string; port: number }): Promise<TcpProxy> {
  let isDown = false;
  const open = new Set<net.Socket>();
  const server = net.createServer((client) => {
    if (isDown) {
      client.destroy();
      return;
    }
    const upstream = net.connect(target.port, target.host);
    open.add(client);
    open.add(upstream);
    const end = () => {
      client.destroy();
      upstream.destroy();
      open.delete(client);
      open.delete(upstream);
    };
    client.on("error", end).on("close", end);
    upstream.on("error", end).on("close", end);
    client.pipe(upstream);
    upstream.pipe(client);
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const port = (server.address() as net.AddressInfo).port;
  return {
    port,
    url: (databaseUrl) => {
      const u = new URL(databaseUrl);
      u.hostname = "127.0.0.1";
      u.port = String(port);
      return u.toString();
    },
    down: () => {
      isDown = true;
      for (const s of open) s.destroy();
      open.clear();
    },
    up: () => {
      isDown = false;
    },
    close: async () => {
      isDown = true;
      for (const s of open) s.destroy();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
