import { describe, it, expect } from 'vitest';
import { alertsConfigSchema, DEFAULT_RULES, notifyConfigSchema } from './index.js';

const issuePaths = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }): string[] =>
  (r.error?.issues ?? []).map((i) => i.path.join('.'));

describe('alertsConfigSchema', () => {
  it('gives the contract defaults with no alerts section (docs/contract-v1.md section 4)', () => {
    const c = alertsConfigSchema.parse({});
    expect(c.low_oxygen).toMatchObject({ enabled: true, below: 2.0, clear: 2.5, raise_after_min: 10 });
    expect(c.low_omega_ar).toMatchObject({ enabled: true, below: 3.0, clear: 3.2, raise_after_min: 30 });
    expect(c.faults.stale).toMatchObject({ factor: 3, min_min: 5 });
    const ids = new Set(DEFAULT_RULES.thresholds.map((r) => `${r.id}:${r.metric}`));
    expect(ids.has('low_oxygen:oxygen.o2_mg_l')).toBe(true);
    expect(ids.has('low_omega_ar:carbonate.omega_ar')).toBe(true);
    expect(ids.has('battery:ctd.battery_v')).toBe(true);
    // Parsing the output again is the identity (the engine re-parses a config the loader already parsed).
    expect(alertsConfigSchema.parse(c)).toEqual(c);
  });
  it('rejects unknown keys and inconsistent rules with their paths', () => {
    expect(issuePaths(alertsConfigSchema.safeParse({ low_oxygen: { below_mg: 2 } }))).toEqual(['low_oxygen']);
    expect(issuePaths(alertsConfigSchema.safeParse({ low_oxygen: { below: 2.0, clear: 1.5 } }))).toEqual([
      'low_oxygen.clear',
    ]);
    const both = alertsConfigSchema.safeParse({ rules: { r1: { metric: 'ctd.sal', below: 30, above: 38 } } });
    expect(issuePaths(both)).toEqual(['rules.r1.below']);
    const wrongClear = alertsConfigSchema.safeParse({
      rules: { r1: { metric: 'ctd.sal', above: 38, clear: 39 } },
    });
    expect(issuePaths(wrongClear)).toEqual(['rules.r1.clear']);
    expect(
      issuePaths(alertsConfigSchema.safeParse({ rules: { stale: { metric: 'ctd.sal', below: 1 } } })),
    ).toEqual(['rules.stale']);
    expect(issuePaths(alertsConfigSchema.safeParse({ rules: { r1: { metric: 'temp', below: 1 } } }))).toEqual(
      ['rules.r1.metric'],
    );
    expect(
      issuePaths(alertsConfigSchema.safeParse({ faults: { battery: { below_v: { toaster: 3 } } } })),
    ).toEqual(['faults.battery.below_v']);
  });
});

describe('notifyConfigSchema', () => {
  it('fills defaults and accepts each channel type', () => {
    const c = notifyConfigSchema.parse({
      channels: {
        ops: {
          type: 'webhook',
          url: 'https://hooks.example.invalid/reef',
          secret: { env: 'REEFD_HOOK_SECRET' },
        },
        mail: {
          type: 'smtp',
          host: 'smtp.example.invalid',
          from: 'reefd@example.invalid',
          to: ['ops@example.invalid'],
          auth: { user: 'reefd', pass: { file: '/run/secrets/smtp' } },
        },
        bus: { type: 'mqtt', topic: 'reef/demo-reef/alerts' },
        ui: { type: 'dashboard' },
      },
    });
    expect(c.channels.mail).toMatchObject({ port: 587, secure: false, min_severity: 'info' });
    expect(c.channels.bus).toMatchObject({ qos: 1, retain: false });
    expect(c).toMatchObject({ group_window_s: 30, renotify_min: 240, digest_threshold: 20 });
    expect(c.rate_limit).toEqual({ max_messages: 6, per_min: 60 });
    expect(c.retry).toEqual({ base_s: 5, max_s: 900 });
    expect(Object.keys(notifyConfigSchema.parse({}).channels)).toEqual(['dashboard']);
  });
  it('rejects inline secrets, wildcard topics and unknown keys', () => {
    const inline = notifyConfigSchema.safeParse({
      channels: { h: { type: 'webhook', url: 'https://x.example.invalid/', secret: 'hunter2' } },
    });
    expect(issuePaths(inline)).toEqual(['channels.h.secret']);
    const wild = notifyConfigSchema.safeParse({ channels: { m: { type: 'mqtt', topic: 'reef/#' } } });
    expect(issuePaths(wild)).toEqual(['channels.m.topic']);
    expect(issuePaths(notifyConfigSchema.safeParse({ digest: 5 }))).toEqual(['']);
  });
});
