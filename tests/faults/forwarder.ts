// A loopback TCP forwarder standing in for the shop's Wi-Fi and a load balancer: each connection goes to the first
// backend that accepts it, and `cut()` drops every connection at once, as a lost network would.
import net from 'node:net';

export type Forwarder = { port: number; cut: () => number; close: () => Promise<void> };

export async function startForwarder(backends: number[]): Promise<Forwarder> {
  const pairs = new Set<[net.Socket, net.Socket]>();
  const server = net.createServer((client) => {
    client.pause();
    client.on('error', () => client.destroy());
    const tryBackend = (i: number) => {
      if (i >= backends.length) return client.destroy();
      const upstream = net.connect(backends[i]!, '127.0.0.1');
      let connected = false;
      upstream.once('error', () => {
        if (connected) return;
        upstream.destroy();
        tryBackend(i + 1); // refused: this backend is down, try the next
      });
      upstream.once('connect', () => {
        connected = true;
        const pair: [net.Socket, net.Socket] = [client, upstream];
        pairs.add(pair);
        const end = () => {
          pairs.delete(pair);
          client.destroy();
          upstream.destroy();
        };
        upstream.on('error', end).on('close', end);
        client.on('error', end).on('close', end);
        client.pipe(upstream);
        upstream.pipe(client);
        client.resume();
      });
    };
    tryBackend(0);
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const port = (server.address() as net.AddressInfo).port;
  return {
    port,
    cut() {
      const n = pairs.size;
      for (const [a, b] of pairs) {
        a.destroy();
        b.destroy();
      }
      pairs.clear();
      return n;
    },
    async close() {
      for (const [a, b] of pairs) {
        a.destroy();
        b.destroy();
      }
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
