// One measurement in a fresh process, so its peak resident memory is its own:
//   node dist/bench/child.js MODE ARGS.json RESULT.json
import { readFileSync, writeFileSync } from 'node:fs';
import { runArquero } from './peer-arquero.js';
import { runFloor } from './floor.js';
import { runOurs } from './ours.js';
import { runWarehouseFloor } from './warehouse-floor.js';

const MODES = {
  ours: runOurs,
  floor: runFloor,
  arquero: runArquero,
  warehouseFloor: runWarehouseFloor,
} as const;

async function main(): Promise<void> {
  const [mode, argsFile, resultFile] = process.argv.slice(2);
  const run = MODES[mode as keyof typeof MODES];
  if (!run || !argsFile || !resultFile) throw new Error(`usage: child.js ${Object.keys(MODES).join('|')} ARGS.json RESULT.json`);
  const args = JSON.parse(readFileSync(argsFile, 'utf8')) as never;
  const result = await run(args);
  writeFileSync(resultFile, JSON.stringify(result));
}

main().then(
  () => process.exit(0),
  (err: unknown) => {
    process.stderr.write(`${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n`);
    process.exit(1);
  },
);
