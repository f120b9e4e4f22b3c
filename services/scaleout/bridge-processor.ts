// Edge mode, the processing half: a Processor (libs/processor's interface) that forwards every message
// the pipeline accepted to the edge bridge and derives nothing, or, with `bridge.derive: true`, also runs
// the real processor for a local dashboard. The daemon's pipeline, archive, acknowledgements, checkpoint
// and restart resume work unchanged: the archive lines after the checkpoint are pushed again at restart
// and so forwarded again (at-least-once; the shore processor drops the duplicates).
import type { ReefdConfig, SensorMessage } from '../../libs/contract/index.js';
import { createProcessor, type Processor, type SensorHealthRow } from '../../libs/processor/index.js';

export function createBridgeProcessor(
  config: ReefdConfig,
  forward: (m: SensorMessage, rxMs: number) => void,
  inner?: Processor,
): Processor {
  if (inner !== undefined) {
    return {
      ...inner,
      push(m, rxMs) {
        forward(m, rxMs);
        return inner.push(m, rxMs);
      },
    };
  }
  // No derivations: the state is the empty processor state (so a checkpoint stays readable by a later
  // run with derive on), and the health table is kept here for the dashboard and /readyz.
  const empty = createProcessor(config);
  const health = new Map<string, SensorHealthRow>();
  let watermark = 0;
  return {
    push(m, rxMs) {
      forward(m, rxMs);
      if (m.tMs > watermark) watermark = m.tMs;
      health.set(`${m.station}/${m.sensor}`, {
        station: m.station,
        sensor: m.sensor,
        kind: m.kind,
        lastSeenMs: m.tMs,
        batteryV: typeof m.battery_v === 'number' ? m.battery_v : null,
        flag: null,
      });
      return { status: 'ok', records: [], late: false };
    },
    drain: () => [],
    snapshot: () => empty.snapshot(),
    watermarkMs: () => watermark,
    counters: () => empty.counters(),
    activeAlerts: () => [],
    sensorHealth: () => [...health.values()],
  };
}
