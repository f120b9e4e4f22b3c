// The intake in its order: archive durable before the processor and the acknowledgement, processor in
// archive order, records numbered with consecutive stream positions, a broker's redelivery archived once
// (and archived after all when its first copy never became durable), rejects to the dead letters.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseConfigText, ReefdError, type DerivedRecord } from '../../libs/contract/index.js';
import { createProcessor } from '../../libs/processor/index.js';
import type { ArchiveWriter, DeadLetter, DeadLetterSink, RawInput, RecordSink } from '../pipeline/types.js';
import { archiveLineBytes } from '../archive/line.js';
import { createBus } from './bus.js';
import { newStream } from './cursor.js';
import { archivedKey } from './decode.js';
import { createPipeline, type PipelineOptions } from './pipeline.js';

const parsed = parseConfigText(readFileSync('deploy/demo/ornen-reef.yaml', 'utf8'));
if (!parsed.ok) throw new Error('demo config');
const config = parsed.config;

/** An archive whose fsync the test releases by hand; `fail` makes the next appends fail with a full disk. */
function heldArchive() {
  const lines: string[] = [];
  const waiting: { line: string; resolve: () => void; reject: (e: Error) => void }[] = [];
  const state = { failNext: 0 };
  const append = (line: string) =>
    new Promise<void>((resolve, reject) => {
      waiting.push({ line, resolve, reject });
    });
  const archive: ArchiveWriter = {
    append,
    appendMessage: (m) => append(archiveLineBytes(m).toString('utf8')),
    flush: async () => undefined,
    close: async () => undefined,
  };
  const sync = () => {
    for (const w of waiting.splice(0)) {
      if (state.failNext > 0) {
        state.failNext--;
        w.reject(new ReefdError('REEFD_DISK_FULL', 'full', { retriable: true }));
      } else {
        lines.push(w.line);
        w.resolve();
      }
    }
  };
  return { archive, lines, sync, state, waiting };
}

/** A sink that remembers every record with the position it was given. */
function capture(): RecordSink & { got: { pos: number | undefined; r: DerivedRecord }[] } {
  const got: { pos: number | undefined; r: DerivedRecord }[] = [];
  return {
    name: 'capture',
    got,
    write: (records, first) =>
      records.forEach((r, i) => got.push({ pos: first === undefined ? undefined : first + i, r })),
    flush: async () => undefined,
    close: async () => undefined,
    stats: () => ({ written: got.length, failed: 0, pending: 0 }),
  };
}

const CREST = 'reef/ornen-reef/crest';
const ctd = (minute: number, extra: object = {}) => ({
  v: 1,
  t: new Date(Date.UTC(2026, 2, 1, 0, minute)).toISOString(),
  temp_c: 27.1,
  sal: 35.2,
  ...extra,
});
const oxy = (minute: number, extra: object = {}) => ({
  v: 1,
  t: new Date(Date.UTC(2026, 2, 1, 0, minute)).toISOString(),
  o2_umol_l: 200,
  temp_c: 27.1,
  ...extra,
});

function input(topic: string, body: object, acks: string[], tag: string, redelivered = false): RawInput {
  return {
    topic,
    payload: new TextEncoder().encode(JSON.stringify(body)),
    rxMs: Date.UTC(2026, 2, 1, 1, 0),
    ack: () => acks.push(tag),
    ...(redelivered ? { redelivered: true } : {}),
  };
}

function pipelineWith(a: ReturnType<typeof heldArchive>, extra: Partial<PipelineOptions> = {}) {
  const processor = createProcessor(config);
  const pushes: string[] = [];
  const sink = capture();
  const stream = newStream('test');
  const p = createPipeline({
    config,
    step: {
      push: async (m, rx) => {
        pushes.push(`${m.station}/${m.sensor}@${m.t}`);
        return processor.push(m, rx);
      },
    },
    archive: a.archive,
    sinks: [sink],
    stream,
    archiveRetries: 3,
    ...extra,
  });
  return { p, pushes, sink, stream };
}

const settle = () => new Promise((r) => setTimeout(r, 0));

describe('intake pipeline', () => {
  it('archives first: no processor, no record and no acknowledgement before the line is durable', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const { p, pushes, sink } = pipelineWith(a);
    const c = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'ctd'));
    const o = p.handle(input(`${CREST}/oxygen/o2-crest`, oxy(0), acks, 'o2'));
    await settle();
    expect(pushes).toEqual([]);
    expect(acks).toEqual([]);
    a.sync();
    await Promise.all([c, o]);
    expect(pushes).toHaveLength(2);
    expect(acks).toEqual(['ctd', 'o2']);
    expect(a.lines).toHaveLength(2);
    expect(sink.got.map((g) => g.r.type)).toContain('oxygen');
  });

  it('numbers records with consecutive stream positions and moves the archive cursor', async () => {
    const a = heldArchive();
    const { p, sink, stream } = pipelineWith(a);
    const all: Promise<void>[] = [];
    for (let i = 0; i < 5; i++) {
      all.push(p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(i), [], `c${i}`)));
      all.push(p.handle(input(`${CREST}/oxygen/o2-crest`, oxy(i), [], `o${i}`)));
    }
    a.sync();
    await Promise.all(all);
    expect(sink.got.length).toBeGreaterThanOrEqual(5);
    expect(sink.got.map((g) => g.pos)).toEqual(sink.got.map((_, i) => i));
    expect(stream.nextPos).toBe(sink.got.length);
    expect(stream.cursor.lines).toBe(10);
    expect(stream.cursor.atRx).toBe(10);
  });

  it('processes in archive order when a full disk makes one line land after the next', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const { p, pushes } = pipelineWith(a);
    const first = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'first'));
    a.state.failNext = 1;
    a.sync(); // the first append fails: a retry is scheduled
    const second = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(1), acks, 'second'));
    a.sync(); // the second is durable before the first's retry
    await second;
    expect(pushes).toEqual(['crest/ctd-crest@2026-03-01T00:01:00.000Z']);
    for (let i = 0; i < 50 && a.waiting.length === 0; i++) await new Promise((r) => setTimeout(r, 50));
    a.sync();
    await first;
    expect(pushes).toEqual([
      'crest/ctd-crest@2026-03-01T00:01:00.000Z',
      'crest/ctd-crest@2026-03-01T00:00:00.000Z',
    ]);
    const order = a.lines.map((l) => (JSON.parse(l) as { msg: { t: string } }).msg.t);
    expect(order).toEqual(['2026-03-01T00:01:00.000Z', '2026-03-01T00:00:00.000Z']);
    // Receive times never go backwards in the archive.
    const rx = a.lines.map((l) => Date.parse((JSON.parse(l) as { rx: string }).rx));
    expect(rx[1]).toBeGreaterThanOrEqual(rx[0] as number);
    expect(acks).toEqual(['second', 'first']);
  });

  it('archives a redelivered message once and acknowledges both deliveries', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const { p, pushes } = pipelineWith(a);
    const one = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'first'));
    const two = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'again', true));
    a.sync();
    await Promise.all([one, two]);
    expect(a.lines).toHaveLength(1);
    expect(pushes).toHaveLength(1);
    expect(acks.sort()).toEqual(['again', 'first']);
    expect(p.stats().redeliveries).toBe(1);
  });

  it('archives a redelivery whose first copy never became durable (it is not acknowledged unarchived)', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const { p } = pipelineWith(a, { archiveRetries: 0 });
    a.state.failNext = 1;
    const one = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'first'));
    a.sync();
    await one;
    expect(acks).toEqual([]);
    const two = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, 'again', true));
    await settle();
    a.sync();
    await two;
    expect(a.lines).toHaveLength(1);
    expect(acks).toEqual(['again']);
    expect(p.stats().redeliveries).toBe(0);
  });

  it('recognises a message of the archive tail after a restart (same key from the stored, parsed form)', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const { p } = pipelineWith(a);
    p.rememberArchived([archivedKey(`${CREST}/ctd/ctd-crest`, JSON.parse(JSON.stringify(ctd(0))))]);
    const raw: RawInput = {
      topic: `${CREST}/ctd/ctd-crest`,
      payload: new TextEncoder().encode(JSON.stringify(ctd(0), null, 2)),
      rxMs: 1,
      ack: () => acks.push('r'),
      redelivered: true,
    };
    await p.handle(raw);
    expect(a.lines).toHaveLength(0);
    expect(acks).toEqual(['r']);
  });

  it('archives the same bytes twice when the source does not mark a redelivery (two messages)', async () => {
    const a = heldArchive();
    const { p } = pipelineWith(a);
    const bad = { v: 1, t: 'x' };
    const one = p.handle(input(`${CREST}/ctd/ctd-crest`, bad, [], '1'));
    const two = p.handle(input(`${CREST}/ctd/ctd-crest`, bad, [], '2'));
    a.sync();
    await Promise.all([one, two]);
    expect(a.lines).toHaveLength(2);
  });

  it('sends rejects to the dead letters with their reason, archived with it, never to the processor', async () => {
    const a = heldArchive();
    const letters: DeadLetter[] = [];
    const dl: DeadLetterSink = {
      write: (l) => void letters.push(l),
      flush: async () => undefined,
      close: async () => undefined,
      suppressed: () => 0,
    };
    const { p, pushes } = pipelineWith(a, { deadLetter: dl });
    const done = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0, { sal: 99 }), [], 'bad'));
    a.sync();
    await done;
    expect(letters.map((l) => l.reason)).toEqual(['out_of_range:sal']);
    expect((JSON.parse(a.lines[0] as string) as { reject: string }).reject).toBe('out_of_range:sal');
    expect(pushes).toEqual([]);
  });

  it('writes the archive line as the contract shapes it, from the one parse', async () => {
    const a = heldArchive();
    const { p } = pipelineWith(a);
    const done = p.handle({
      topic: `${CREST}/ctd/ctd-crest`,
      payload: new TextEncoder().encode(
        '{ "v": 1, "t": "2026-03-01T00:00:00Z", "temp_c": 27.1, "sal": 35.2 }',
      ),
      rxMs: Date.UTC(2026, 2, 1, 1),
      ack: () => undefined,
    });
    a.sync();
    await done;
    expect(JSON.parse(a.lines[0] as string)).toEqual({
      topic: `${CREST}/ctd/ctd-crest`,
      rx: '2026-03-01T01:00:00.000Z',
      msg: { v: 1, t: '2026-03-01T00:00:00Z', temp_c: 27.1, sal: 35.2 },
    });
    const notJson = p.handle({
      topic: `${CREST}/ctd/ctd-crest`,
      payload: new TextEncoder().encode('not json'),
      rxMs: Date.UTC(2026, 2, 1, 1),
      ack: () => undefined,
    });
    a.sync();
    await notJson;
    expect(JSON.parse(a.lines[1] as string)).toMatchObject({ msg: 'not json', reject: 'json_syntax' });
  });

  it('runs a checkpoint between two processor steps, never inside one', async () => {
    const a = heldArchive();
    const seen: string[] = [];
    let release: () => void = () => undefined;
    const processor = createProcessor(config);
    const p = createPipeline({
      config,
      step: {
        push: async (m, rx) => {
          seen.push(`start ${m.t}`);
          if (seen.length === 1) await new Promise<void>((r) => (release = r));
          seen.push(`end ${m.t}`);
          return processor.push(m, rx);
        },
      },
      archive: a.archive,
      sinks: [],
      stream: newStream('t'),
    });
    const one = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), [], '1'));
    const two = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(1), [], '2'));
    a.sync();
    await settle();
    const rest = p.atRest(() => seen.push('checkpoint'));
    release();
    await Promise.all([one, two, rest]);
    expect(seen.indexOf('checkpoint')).toBe(seen.indexOf('end 2026-03-01T00:00:00.000Z') + 1);
    expect(seen).toHaveLength(5);
  });

  it('holds the processor through an async checkpoint, archiving and acknowledging nothing past it meanwhile', async () => {
    const a = heldArchive();
    const seen: string[] = [];
    const acks: string[] = [];
    const processor = createProcessor(config);
    const p = createPipeline({
      config,
      step: {
        push: async (m, rx) => {
          seen.push(`push ${m.t}`);
          return processor.push(m, rx);
        },
      },
      archive: a.archive,
      sinks: [],
      stream: newStream('t'),
    });
    let finish: () => void = () => undefined;
    const rest = p.atRest(async () => {
      seen.push('checkpoint start');
      await new Promise<void>((r) => (finish = r));
      seen.push('checkpoint end');
      return 'text';
    });
    // The checkpoint began at once (the processor was idle); messages arrive while it is made.
    expect(seen).toEqual(['checkpoint start']);
    const one = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(0), acks, '1'));
    const two = p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(1), acks, '2'));
    a.sync();
    await settle();
    // Archived (durable) but neither processed nor acknowledged while the checkpoint holds the processor.
    expect(a.lines).toHaveLength(2);
    expect(seen).toEqual(['checkpoint start']);
    expect(acks).toEqual([]);
    finish();
    await expect(rest).resolves.toBe('text');
    await Promise.all([one, two]);
    expect(seen).toEqual([
      'checkpoint start',
      'checkpoint end',
      'push 2026-03-01T00:00:00.000Z',
      'push 2026-03-01T00:01:00.000Z',
    ]);
    expect(acks).toEqual(['1', '2']);
  });

  it('keeps a window of messages at the step, finishing them in archive order, and checkpoints with none there', async () => {
    const a = heldArchive();
    const acks: string[] = [];
    const processor = createProcessor(config);
    const calls: { t: string; done: () => void }[] = [];
    const p = createPipeline({
      config,
      // Each result waits until the test lets it go, as a worker thread's reply would.
      step: {
        push: (m, rx) =>
          new Promise((resolve) => {
            const r = processor.push(m, rx);
            calls.push({ t: m.t, done: () => resolve(r) });
          }),
      },
      archive: a.archive,
      sinks: [],
      stream: newStream('t'),
      stepWindow: 3,
    });
    const all = [0, 1, 2, 3, 4].map((i) => p.handle(input(`${CREST}/oxygen/o2-crest`, oxy(i), acks, `${i}`)));
    a.sync();
    await settle();
    // Three sent ahead, none acknowledged before its result.
    expect(calls.map((c) => c.t.slice(11, 16))).toEqual(['00:00', '00:01', '00:02']);
    expect(acks).toEqual([]);
    let rested = false;
    const rest = p.atRest(() => {
      rested = true;
      return calls.length;
    });
    calls[1]!.done(); // the second answers first: nothing is finished out of order
    await settle();
    expect(acks).toEqual([]);
    calls[0]!.done();
    calls[2]!.done();
    await settle();
    // The window emptied before the checkpoint, which ran before any further message was sent.
    expect(acks).toEqual(['0', '1', '2']);
    expect(rested).toBe(true);
    await expect(rest).resolves.toBe(3);
    await settle();
    expect(calls).toHaveLength(5);
    calls[3]!.done();
    calls[4]!.done();
    await Promise.all(all);
    expect(acks).toEqual(['0', '1', '2', '3', '4']);
    expect(calls.map((c) => c.t.slice(11, 16))).toEqual(['00:00', '00:01', '00:02', '00:03', '00:04']);
  });

  it('tells the bus once when a logger restarts its seq, and keeps its data', async () => {
    const a = heldArchive();
    const bus = createBus<readonly DerivedRecord[]>(() => undefined);
    const alerts: DerivedRecord[] = [];
    bus.subscribe((rs) =>
      alerts.push(...rs.filter((r) => r.type === 'alert' && String(r.rule).startsWith('reefd.'))),
    );
    const { p, pushes } = pipelineWith(a, { bus });
    const all: Promise<void>[] = [];
    for (let i = 0; i < 5; i++)
      all.push(p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(i, { seq: i }), [], `a${i}`)));
    for (let i = 0; i < 3; i++)
      all.push(p.handle(input(`${CREST}/ctd/ctd-crest`, ctd(10 + i, { seq: i }), [], `b${i}`)));
    a.sync();
    await Promise.all(all);
    expect(pushes).toHaveLength(8);
    expect(alerts.map((r) => [r.rule, (r as { sensor?: string }).sensor, r.value])).toEqual([
      ['reefd.sensor_reboot', 'ctd-crest', 0],
    ]);
    expect(p.stats().sensorReboots).toBe(1);
  });
});
