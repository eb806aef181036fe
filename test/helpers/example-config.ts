// The shipped example config, parsed once, for tests that need a catalog but no data.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parseConfigText } from '../../config/load.js';

export const EXAMPLE_CONFIG_PATH = fileURLToPath(new URL('../../config/examples/skerrywake.yaml', import.meta.url));
export const exampleConfig = parseConfigText(readFileSync(EXAMPLE_CONFIG_PATH, 'utf8'), EXAMPLE_CONFIG_PATH);
export const exampleDataset = exampleConfig.datasets[0]!;
