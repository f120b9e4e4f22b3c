import { describe, it, expect } from 'vitest';
import { appendFile, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { Journal, readJournal } from './journal.js';
import { tempDir } from './test-helpers.js';

describe('journal', () => {
  it('appends in call order, skips a torn last line, compacts atomically and reads incrementally', async () => {
    const path = join(await tempDir(), 'j.jsonl');
    const j = new Journal(path);
    await j.open();
    await Promise.all([j.append([{ n: 1 }]), j.append([{ n: 2 }, { n: 3 }])]);
    expect(j.lines).toBe(3);
    await appendFile(path, '{"n": 4, "tor'); // a crash mid-write
    const r1 = await readJournal(path);
    expect(r1.records).toEqual([{ n: 1 }, { n: 2 }, { n: 3 }]);
    await j.compact([{ snap: true }]);
    expect(await readFile(path, 'utf8')).toBe('{"snap":true}\n');
    await j.append([{ n: 5 }]);
    const r2 = await readJournal(path);
    expect(r2.records).toEqual([{ snap: true }, { n: 5 }]);
    await j.append([{ n: 6 }]);
    expect((await readJournal(path, r2.end)).records).toEqual([{ n: 6 }]);
    await j.close();
    expect((await readJournal(join(path, '..', 'missing.jsonl'))).records).toEqual([]);
  });
});
