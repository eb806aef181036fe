// `threadcount init` on a public dataset it has never seen: vega-datasets'
// unemployment-across-industries.json (US BLS monthly unemployment by industry, 2000–2010), which
// carries its date both whole (`date`) and in parts (`year`, `month`).
import { mkdtempSync, readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { main } from '../../cli/main.js';

const json = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'unemployment-across-industries.json');
afterEach(() => vi.restoreAllMocks());

async function run(args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((err += String(s)), true));
  const code = await main(args);
  vi.restoreAllMocks();
  return { code, out, err };
}

describe('threadcount init', () => {
  it('takes the date column, leaves out its year and month parts, and keeps the path of a file elsewhere absolute', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-init-')), 'unemployment.yaml');
    const r = await run(['init', '--source', json, '--out', file]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('left out (parts of the date in date): year, month');
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.time_column).toBe('date');
    expect(ds.source).toEqual({ kind: 'json', paths: [json] });
    const metrics = ds.metrics as Record<string, unknown>[];
    // Nothing adds up a calendar part.
    expect(metrics.map((m) => m.sum ?? m.average ?? m.count)).toEqual(['rows', 'count', 'rate']);
    expect(metrics.find((m) => m.name === 'rate')).toMatchObject({ average: 'rate', kind: 'level' });
    expect(ds.dimensions).toEqual([expect.objectContaining({ name: 'series', column: 'series' })]);
    const check = await run(['check', '--config', file]);
    expect(check.code).toBe(0);
    // The file holds 14 industries, monthly from January 2000 to February 2010 (BLS via vega-datasets).
    expect(check.out).toMatch(/1,708 rows, 2000-01-01 to 2010-02-01, stamped monthly/);
    expect(check.out).toMatch(/series: 14 values/);
  });
});
