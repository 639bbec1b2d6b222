import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { planKeying } from '../../src/core/timing/plan.js';
import { planToCsv } from '../../src/io/export.js';
import { realServices } from '../../src/tui/services.js';
import { DEFAULT_SETTINGS } from '../../src/tui/plan/plan-model.js';
import { RECORDINGS } from '../../scripts/make-recordings.js';

const dir = mkdtempSync(join(tmpdir(), 'keyform-tui-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('the app services', () => {
  it('lists the bundled demo recordings', async () => {
    const list = await realServices().listRecordings('recordings');
    expect(list.files.map((f) => f.name)).toEqual(RECORDINGS.map((r) => r.file).sort());
    expect(list.open).toBeUndefined();
    const one = await realServices().listRecordings(`recordings/${RECORDINGS[0]!.file}`);
    expect(one.open).toMatch(new RegExp(`${RECORDINGS[0]!.file}$`));
  });

  it('exports exactly what encode writes, and refuses to replace a file without a yes', async () => {
    const services = realServices();
    const settings = { ...DEFAULT_SETTINGS, message: 'Q7ZKT TEST', wpm: 20 };
    const path = join(dir, 'plan.csv');
    expect(await services.exportPlan(settings, 'csv', path, false)).toMatch(/^wrote plan\.csv \(csv, \d+ bytes\)$/);
    expect(readFileSync(path, 'utf8')).toBe(planToCsv(planKeying('Q7ZKT TEST', { wpm: 20 })));
    expect(services.fileExists(path)).toBe(true);
    await expect(services.exportPlan(settings, 'csv', path, false)).rejects.toThrow(/already exists/);
    await expect(services.exportPlan({ ...settings, wpm: 25 }, 'csv', path, true)).resolves.toMatch(/wrote/);
    expect(readFileSync(path, 'utf8')).toBe(planToCsv(planKeying('Q7ZKT TEST', { wpm: 25 })));
  });

  it('writes a WAV export that starts with a RIFF/WAVE header', async () => {
    const path = join(dir, 'plan.wav');
    await realServices().exportPlan({ ...DEFAULT_SETTINGS, message: 'E' }, 'wav', path, false);
    const bytes = readFileSync(path);
    expect(bytes.subarray(0, 4).toString('ascii')).toBe('RIFF');
    expect(bytes.subarray(8, 12).toString('ascii')).toBe('WAVE');
  });
});
