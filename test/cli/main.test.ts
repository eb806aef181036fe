// The command line reports problems a user can fix as one clear message and an exit code.
import { mkdtempSync, writeFileSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { main } from '../../cli/main.js';
import { EXAMPLE_CONFIG_PATH } from '../helpers/example-config.js';

let stderr = '';
let stdout = '';
function capture() {
  stderr = '';
  stdout = '';
  vi.spyOn(process.stderr, 'write').mockImplementation((s) => ((stderr += String(s)), true));
  vi.spyOn(process.stdout, 'write').mockImplementation((s) => ((stdout += String(s)), true));
}
afterEach(() => vi.restoreAllMocks());

const dir = mkdtempSync(join(tmpdir(), 'threadcount-cli-'));

describe('threadcount command errors', () => {
  it('names the file, line and key of a broken config', async () => {
    const broken = join(dir, 'broken.yaml');
    writeFileSync(broken, readFileSync(EXAMPLE_CONFIG_PATH, 'utf8').replace('unit: currency', 'unit: dollars'));
    capture();
    const code = await main(['ask', '--config', broken, '--request', 'revenue trend', '--out', join(dir, 'o1')]);
    expect(code).toBe(2);
    expect(stderr).toMatch(/broken\.yaml:\d+: datasets\[0\]\.metrics\[0\]\.unit: /);
    expect(stderr).not.toMatch(/\n\s+at /);
  });

  it('says when the data file is missing', async () => {
    const cfg = join(dir, 'nodata.yaml');
    writeFileSync(cfg, readFileSync(EXAMPLE_CONFIG_PATH, 'utf8'));
    capture();
    const code = await main(['ask', '--config', cfg, '--request', 'revenue trend', '--out', join(dir, 'o2')]);
    expect(code).toBe(3);
    expect(stderr).toMatch(/dataset could not be used: the data file .*skerrywake\.duckdb does not exist/);
  });

  it('says which arguments are missing or wrong', async () => {
    capture();
    expect(await main(['ask', '--config', 'x.yaml'])).toBe(2);
    expect(stderr).toMatch(/ask needs --config FILE, --request "TEXT" and --out DIR/);
    capture();
    expect(await main(['demo', '--out', dir, '--rows', 'many'])).toBe(2);
    expect(stderr).toMatch(/--rows must be a whole number/);
    capture();
    expect(await main(['frobnicate'])).toBe(2);
    expect(stderr).toMatch(/unknown command "frobnicate"/);
  });

  it('prints usage for help', async () => {
    capture();
    expect(await main(['help'])).toBe(0);
    expect(stdout).toMatch(/threadcount ask --config FILE/);
  });
});
