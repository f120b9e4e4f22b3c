// MQTT intake (contract section 1): QoS 1 on `<prefix>/<site>/#`, MQTT 5 persistent session (fixed client
// id, clean start off, session expiry from the configuration) so the broker queues messages while reefd is
// down, and PUBACK only once the message is durably in the raw archive (RawInput.ack()).
//
// Why not mqtt.js' `customHandleAcks` or a `handleMessage` override: mqtt.js 5.16 processes incoming packets
// one at a time and reads the next packet only after that callback returned and the PUBACK was written
// (node_modules/mqtt/build/lib/client.js, `work`/`nextTickWork`; handlers/publish.js). Holding the callback
// until the archive's fsync (up to fsync_ms) would cap intake at a few messages per group commit. Instead
// the PUBACK packet itself is held back: `_sendPacket` is wrapped so a PUBACK for a message not yet
// acknowledged completes at once for mqtt.js (which moves on) and is written when ack() is called. The
// number held is bounded by the MQTT 5 Receive Maximum we announce, which the broker honours.
// A PUBACK held when the connection drops is discarded (message ids belong to one connection); the broker
// redelivers those messages on reconnect. A broker that restarted from its persistence file sends them
// without the DUP flag, and also resends messages whose PUBACK went out just before it stopped (it never
// read it); so the source remembers what it was holding and what it acknowledged in the last seconds before
// the connection dropped (topic and payload digest), and marks the first identical message on the next
// connection as a redelivery; the pipeline then archives it once (it is already in the archive).
import { createHash } from 'node:crypto';
import mqtt, { type IClientOptions, type IPublishPacket, type MqttClient, type Packet } from 'mqtt';
import type { RawInput, Source } from '../pipeline/types.js';
import type { Logger } from '../log/logger.js';
import { backoffDelayMs } from '../transport/backoff.js';
import { tlsOptions, type TlsFiles } from '../transport/tls.js';

export interface MqttSourceOptions {
  url: string;
  clientId: string;
  username?: string | undefined;
  /** Resolved by the caller; never logged. */
  password?: string | undefined;
  tls?: TlsFiles | undefined;
  /** false (default in the configuration) keeps the broker session across restarts. */
  cleanStart: boolean;
  sessionExpiryS: number;
  topicPrefix: string;
  site: string;
  logger: Logger;
  clock?: () => number;
  /**
   * 5 (default) for Mosquitto; 4 (MQTT 3.1.1) for brokers without MQTT 5 such as the demo's embedded one.
   * The held-PUBACK mechanism works the same on both; session expiry and Receive Maximum are MQTT 5 only
   * (with 4 a persistent session is `clean: false` and lasts as long as the broker keeps it).
   * Without Receive Maximum the broker's own in-flight limit bounds the held PUBACKs (Mosquitto:
   * max_inflight_messages, 20 by default), which also caps intake at that many messages per archive fsync.
   */
  protocolVersion?: 4 | 5;
  /** MQTT 5 Receive Maximum: messages in flight without PUBACK (default 1000). */
  receiveMaximum?: number;
  reconnect?: { baseMs: number; maxMs: number };
  /** start() resolves at the first connection or after this long (and keeps retrying); default 10 s. */
  startTimeoutMs?: number;
  /** stop() waits this long for held acknowledgements before disconnecting (default 2 s). */
  drainMs?: number;
}

export interface MqttSource extends Source {
  /** Messages pushed whose ack() has not been called yet, on the current connection. */
  unacked(): number;
}

interface Held {
  acked: boolean;
  send: (() => void) | undefined;
  topic: string;
  payload: Buffer;
}

/** Digest of a message for recognising it after a reconnect. */
function digest(topic: string, payload: Buffer): string {
  return `${topic}\u0000${createHash('sha1').update(payload).digest('base64')}`;
}

/** How long voided messages are watched for after the connection dropped. */
const REDELIVERY_WATCH_MS = 10 * 60_000;
/** Acknowledged messages remembered for that: at most this many, released this recently before the drop. */
const RECENT_ACKED = 1000;
const RECENT_ACKED_MS = 10_000;

type SendPacket = (packet: Packet, cb?: (err?: Error) => void, ...rest: unknown[]) => void;

class MqttIntake implements MqttSource {
  readonly name = 'mqtt';
  readonly #o: MqttSourceOptions;
  #client: MqttClient | undefined;
  #held = new Map<number, Held>();
  /** Messages whose PUBACK a dropped connection voided: digest -> copies expected. */
  #voided = new Map<string, number>();
  #voidedUntilMs = 0;
  /** The last acknowledged messages (a ring), for a broker that did not read their PUBACK before a drop. */
  #acked: ({ topic: string; payload: Buffer; atMs: number } | undefined)[] = new Array(RECENT_ACKED);
  #ackedNext = 0;
  #generation = 0;
  #stopping = false;
  #attempt = 0;
  #reconnectTimer: NodeJS.Timeout | undefined;
  #drained: (() => void) | undefined;

  constructor(o: MqttSourceOptions) {
    this.#o = o;
  }

  get filter(): string {
    return `${this.#o.topicPrefix}/${this.#o.site}/#`;
  }

  start(push: (input: RawInput) => void): Promise<void> {
    const o = this.#o;
    const v5 = (o.protocolVersion ?? 5) === 5;
    const opts: IClientOptions = {
      protocolVersion: v5 ? 5 : 4,
      clientId: o.clientId,
      clean: o.cleanStart,
      ...(v5
        ? {
            properties: { sessionExpiryInterval: o.sessionExpiryS, receiveMaximum: o.receiveMaximum ?? 1000 },
          }
        : {}),
      // Reconnects are ours, with backoff and jitter (below); mqtt.js' own retry is a fixed period.
      reconnectPeriod: 0,
      connectTimeout: 10_000,
      keepalive: 30,
      resubscribe: false,
    };
    const tls = tlsOptions(o.tls);
    if (tls.ca !== undefined) opts.ca = tls.ca as Buffer;
    if (tls.cert !== undefined) opts.cert = tls.cert as Buffer;
    if (tls.key !== undefined) opts.key = tls.key as Buffer;
    if (tls.rejectUnauthorized !== undefined) opts.rejectUnauthorized = tls.rejectUnauthorized;
    if (o.username !== undefined) opts.username = o.username;
    if (o.password !== undefined) opts.password = o.password;
    const client = mqtt.connect(o.url, opts);
    this.#client = client;
    this.#holdPubacks(client);

    client.on('connect', (connack) => {
      this.#attempt = 0;
      o.logger.info(
        { url: o.url, clientId: o.clientId, sessionPresent: connack.sessionPresent },
        'mqtt connected',
      );
      // Subscribing again on a present session is harmless; it also covers a broker that lost the session.
      // Retain handling 1 (MQTT 5): retained messages only for a new subscription, not on every reconnect.
      client.subscribe(this.filter, v5 ? { qos: 1, rh: 1 } : { qos: 1 }, (err) => {
        if (err) o.logger.error({ err: err.message, filter: this.filter }, 'mqtt subscribe failed');
      });
    });
    client.on('message', (topic: string, payload: Buffer, packet: IPublishPacket) => {
      if (this.#stopping) return; // not pushed, not acknowledged: the broker keeps it
      const gen = this.#generation;
      const id = packet.messageId;
      const now = (o.clock ?? Date.now)();
      let redelivered = packet.dup;
      if (!redelivered && this.#voided.size > 0) {
        if (now > this.#voidedUntilMs) this.#voided.clear();
        else {
          const k = digest(topic, payload);
          const n = this.#voided.get(k);
          if (n !== undefined) {
            redelivered = true;
            if (n <= 1) this.#voided.delete(k);
            else this.#voided.set(k, n - 1);
          }
        }
      }
      let ack: () => void = () => undefined;
      if (packet.qos > 0 && id !== undefined) {
        const held: Held = { acked: false, send: undefined, topic, payload };
        this.#held.set(id, held);
        ack = () => {
          if (gen !== this.#generation || this.#held.get(id) !== held || held.acked) return;
          held.acked = true;
          if (held.send !== undefined) this.#release(id, held);
        };
      }
      // DUP: the broker sends this again (it did not see our PUBACK); the intake archives it once.
      push({
        topic,
        payload,
        rxMs: now,
        ack,
        ...(redelivered ? { redelivered: true } : {}),
      });
    });
    client.on('close', () => {
      // Message ids are per connection: held PUBACKs are void now, the broker redelivers.
      this.#generation++;
      const now = (o.clock ?? Date.now)();
      const recent = this.#acked.filter((a) => a !== undefined && now - a.atMs <= RECENT_ACKED_MS);
      for (const h of [...this.#held.values(), ...(recent as { topic: string; payload: Buffer }[])]) {
        const k = digest(h.topic, h.payload);
        this.#voided.set(k, (this.#voided.get(k) ?? 0) + 1);
      }
      if (this.#voided.size > 0) this.#voidedUntilMs = now + REDELIVERY_WATCH_MS;
      this.#held.clear();
      this.#acked = new Array(RECENT_ACKED);
      this.#ackedNext = 0;
      this.#drained?.();
      if (!this.#stopping) this.#scheduleReconnect();
    });
    client.on('error', (err) => o.logger.warn({ err: err.message, url: o.url }, 'mqtt error'));
    client.on('offline', () => o.logger.warn({ url: o.url }, 'mqtt offline'));

    return new Promise<void>((resolve) => {
      const t = setTimeout(() => {
        o.logger.warn({ url: o.url }, 'mqtt broker not reachable yet; intake keeps retrying with backoff');
        resolve();
      }, o.startTimeoutMs ?? 10_000);
      t.unref();
      client.once('connect', () => {
        clearTimeout(t);
        resolve();
      });
    });
  }

  #holdPubacks(client: MqttClient): void {
    const inner = client as unknown as { _sendPacket: SendPacket };
    const original = inner._sendPacket.bind(client) as SendPacket;
    inner._sendPacket = (packet, cb, ...rest) => {
      if (packet.cmd === 'puback' && packet.messageId !== undefined) {
        const id = packet.messageId;
        const held = this.#held.get(id);
        if (held !== undefined) {
          held.send = () => original(packet, undefined, ...rest);
          if (held.acked) this.#release(id, held);
          // mqtt.js may read the next packet now; the PUBACK goes out at ack().
          cb?.();
          return;
        }
      }
      original(packet, cb, ...rest);
    };
  }

  #release(id: number, held: Held): void {
    this.#held.delete(id);
    held.send?.();
    this.#acked[this.#ackedNext] = {
      topic: held.topic,
      payload: held.payload,
      atMs: (this.#o.clock ?? Date.now)(),
    };
    this.#ackedNext = (this.#ackedNext + 1) % RECENT_ACKED;
    if (this.#held.size === 0) this.#drained?.();
  }

  #scheduleReconnect(): void {
    if (this.#reconnectTimer !== undefined) return;
    const r = this.#o.reconnect ?? { baseMs: 500, maxMs: 30_000 };
    const delay = Math.max(100, backoffDelayMs(this.#attempt++, { ...r, random: Math.random }));
    this.#reconnectTimer = setTimeout(() => {
      this.#reconnectTimer = undefined;
      if (!this.#stopping) this.#client?.reconnect();
    }, delay);
  }

  async stop(): Promise<void> {
    const client = this.#client;
    if (client === undefined || this.#stopping) return;
    this.#stopping = true;
    if (this.#reconnectTimer !== undefined) clearTimeout(this.#reconnectTimer);
    // Give acknowledgements already on their way (archive fsync) a moment to go out.
    if (this.#held.size > 0 && client.connected) {
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, this.#o.drainMs ?? 2_000);
        this.#drained = () => {
          clearTimeout(t);
          resolve();
        };
      });
    }
    await client.endAsync(false);
  }

  connected(): boolean {
    return this.#client?.connected ?? false;
  }

  unacked(): number {
    return this.#held.size;
  }
}

export function createMqttSource(opts: MqttSourceOptions): MqttSource {
  return new MqttIntake(opts);
}
