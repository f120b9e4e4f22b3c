// The demo's embedded MQTT broker (aedes, in memory, loopback only). aedes speaks MQTT 3.1.1, so clients of
// the embedded broker connect with protocol version 4; production uses Mosquitto (deploy/mosquitto/).
import net from 'node:net';
import type { AddressInfo } from 'node:net';

export interface EmbeddedBroker {
  url: string;
  port: number;
  close(): Promise<void>;
}

/** Starts aedes on host:port (port 0 = any free port). */
export async function startEmbeddedBroker(host = '127.0.0.1', port = 0): Promise<EmbeddedBroker> {
  // aedes 1.x is ESM-only and loads lazily: only the demo needs it.
  const { Aedes } = await import('aedes');
  const broker = await Aedes.createBroker({ concurrency: 1000, queueLimit: 100_000 });
  const server = net.createServer(broker.handle);
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  const bound = (server.address() as AddressInfo).port;
  return {
    url: `mqtt://${host}:${bound}`,
    port: bound,
    close: async () => {
      await new Promise<void>((r) => server.close(() => r()));
      await new Promise<void>((r) => broker.close(() => r()));
    },
  };
}
