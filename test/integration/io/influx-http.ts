// Read-back helpers for the database tests: InfluxDB 1.x /query and VictoriaMetrics /api/v1/export.
export async function influxQuery(
  url: string,
  db: string | undefined,
  q: string,
): Promise<{ columns: string[]; values: unknown[][] }[]> {
  const body = new URLSearchParams({ q, epoch: 'ms' });
  if (db !== undefined) body.set('db', db);
  const res = await fetch(`${url}/query`, { method: 'POST', body });
  const json = (await res.json()) as {
    results?: { series?: { columns: string[]; values: unknown[][] }[]; error?: string }[];
  };
  const r = json.results?.[0];
  if (r?.error !== undefined) throw new Error(`InfluxDB: ${r.error}`);
  return r?.series ?? [];
}

/** Rows of the first series as objects keyed by column. */
export function rows(series: { columns: string[]; values: unknown[][] }[]): Record<string, unknown>[] {
  const out: Record<string, unknown>[] = [];
  for (const s of series)
    for (const v of s.values) out.push(Object.fromEntries(s.columns.map((c, i) => [c, v[i]])));
  return out;
}

export interface VmSeries {
  metric: Record<string, string>;
  values: number[];
  timestamps: number[];
}

export async function vmExport(url: string, match: string): Promise<VmSeries[]> {
  await fetch(`${url}/internal/force_flush`);
  const res = await fetch(`${url}/api/v1/export`, {
    method: 'POST',
    body: new URLSearchParams({ 'match[]': match }),
  });
  const text = await res.text();
  return text
    .split('\n')
    .filter((l) => l.trim() !== '')
    .map((l) => JSON.parse(l) as VmSeries);
}
