// Sensor traffic with exact bookkeeping: every message has a unique (station, sensor, t), so the archive,
// the processor and the database can each be counted against the set the publisher got acknowledged.
import mqtt, { type MqttClient } from 'mqtt';

export interface Msg {
  topic: string;
  payload: string;
  /** `station/sensor/tMs`, unique per message. */
  key: string;
  kind: 'ctd' | 'oxygen' | 'garbage';
  tMs: number;
}

/**
 * n oxygen messages one second apart from startMs, each preceded by a CTD sample at the same time every
 * `ctdEvery` messages (so every oxygen message has a CTD within the pairing distance).
 */
export function oxygenSeries(o: {
  prefix: string;
  site: string;
  startMs: number;
  n: number;
  stepMs?: number;
  ctdEvery?: number;
  firstSeq?: number;
}): Msg[] {
  const step = o.stepMs ?? 1000;
  const every = o.ctdEvery ?? 30;
  const out: Msg[] = [];
  for (let i = 0; i < o.n; i++) {
    const tMs = o.startMs + i * step;
    const t = new Date(tMs).toISOString();
    if (i % every === 0) out.push(ctd(o.prefix, o.site, tMs));
    out.push({
      topic: `${o.prefix}/${o.site}/s1/oxygen/o1`,
      payload: JSON.stringify({
        v: 1,
        t,
        seq: (o.firstSeq ?? 0) + i,
        o2_umol_l: 190 + (i % 17),
        temp_c: 27.5,
      }),
      key: `s1/o1/${tMs}`,
      kind: 'oxygen',
      tMs,
    });
  }
  return out;
}

export function ctd(prefix: string, site: string, tMs: number): Msg {
  return {
    topic: `${prefix}/${site}/s1/ctd/c1`,
    payload: JSON.stringify({ v: 1, t: new Date(tMs).toISOString(), temp_c: 27.5, sal: 35.1 }),
    key: `s1/c1/${tMs}`,
    kind: 'ctd',
    tMs,
  };
}

export interface Publisher {
  client: MqttClient;
  /** Keys whose PUBACK arrived. */
  acked: Set<string>;
  sent: number;
  errors: number;
  /** Publishes with at most `window` messages in flight; resolves when every publish has settled. */
  publish(
    msgs: readonly Msg[],
    window?: number,
    onProgress?: (done: number) => void,
    ratePerS?: number,
  ): Promise<void>;
  end(): Promise<void>;
}

export async function connectPublisher(url: string, clientId: string): Promise<Publisher> {
  const client = mqtt.connect(url, {
    clientId,
    protocolVersion: 5,
    clean: false,
    reconnectPeriod: 200,
    connectTimeout: 5000,
  });
  await new Promise<void>((resolve, reject) => {
    client.once('connect', () => resolve());
    client.once('error', reject);
  });
  client.on('error', () => undefined);
  const p: Publisher = {
    client,
    acked: new Set(),
    sent: 0,
    errors: 0,
    async publish(msgs, window = 200, onProgress, ratePerS) {
      let next = 0;
      let done = 0;
      const t0 = Date.now();
      await new Promise<void>((resolve) => {
        let timer: NodeJS.Timeout | undefined;
        const launch = (): void => {
          while (next < msgs.length && next - done < window) {
            if (ratePerS !== undefined && next >= ((Date.now() - t0) / 1000) * ratePerS) {
              timer ??= setTimeout(() => {
                timer = undefined;
                launch();
              }, 20);
              return;
            }
            const m = msgs[next++] as Msg;
            p.sent++;
            client.publish(m.topic, m.payload, { qos: 1 }, (err) => {
              if (err) p.errors++;
              else p.acked.add(m.key);
              done++;
              onProgress?.(done);
              if (done === msgs.length) resolve();
              else launch();
            });
          }
        };
        if (msgs.length === 0) resolve();
        else launch();
      });
    },
    end: () => new Promise<void>((r) => client.end(false, {}, () => r())),
  };
  return p;
}
