// NetCDF export: plans every station and transect file in one pass over the winning records, fills their
// values in a second, then writes each file atomically (temp name, rename). Memory: 8 bytes per exported
// number plus a time index per file; the records themselves are streamed.
import { rename, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { encodeNetcdf } from '../../libs/netcdf/index.js';
import { buildDataset, GroupPlan, GroupValues, groupOf, position, type CfContext } from './cf.js';
import { eachWinner, type ScanResult } from './scan.js';

export const fileNameOf = (site: string, subject: string, id: string): string =>
  `${site}_${subject}_${id}.nc`.replace(/[^A-Za-z0-9_.-]/g, '_');

export async function exportNetcdf(
  recordsFile: string,
  scan: ScanResult,
  outDir: string,
  ctx: Omit<CfContext, 'site'>,
): Promise<{ files: string[]; site: string | undefined; withoutPosition: string[] }> {
  const plans = new Map<string, GroupPlan>();
  let site: string | undefined;
  for await (const r of eachWinner(recordsFile, scan)) {
    site ??= r.site;
    const g = groupOf(r);
    if (g === undefined) continue;
    const k = `${g.subject}|${g.id}`;
    let p = plans.get(k);
    if (p === undefined) {
      p = new GroupPlan(g);
      plans.set(k, p);
    }
    p.add(r);
  }
  const values = new Map([...plans].map(([k, p]) => [k, new GroupValues(p)]));
  for await (const r of eachWinner(recordsFile, scan)) {
    const g = groupOf(r);
    if (g !== undefined) values.get(`${g.subject}|${g.id}`)?.add(r);
  }
  const files: string[] = [];
  const withoutPosition: string[] = [];
  for (const v of [...values.values()].sort((a, b) => (a.plan.key.id < b.plan.key.id ? -1 : 1))) {
    if (position(ctx, v.plan.key) === undefined)
      withoutPosition.push(`${v.plan.key.subject} ${v.plan.key.id}`);
    const ds = buildDataset({ ...ctx, site: site ?? 'site' }, v);
    const file = path.join(outDir, fileNameOf(site ?? 'site', v.plan.key.subject, v.plan.key.id));
    const tmp = `${file}.tmp-${process.pid}`;
    await writeFile(tmp, encodeNetcdf(ds));
    await rename(tmp, file);
    files.push(file);
  }
  return { files, site, withoutPosition };
}
