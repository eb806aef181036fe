// What the reader knows of the demo data without opening it: the example catalog, the demo's
// coverage and its breakdowns' values, as the generator writes them (config/demo/demo-effects.ts).
import type { ValueIndex } from '../../analysis/values/value-index.js';
import type { DatasetFacts } from '../../bot/reading/read-request.js';
import { FARE_CLASSES, PERIOD_END, PERIOD_START, ROUTES } from '../../config/demo/demo-effects.js';
import { exampleDataset } from './example-config.js';

const values = (xs: readonly string[]) => ({ values: xs.map((value, i) => ({ value, rows: 1000 - i })), complete: true });

export const exampleValues: ValueIndex = new Map([
  ['route', values(ROUTES.map((r) => r.name))],
  ['fare_class', values(FARE_CLASSES.map((f) => f.name))],
  ['channel', values(['app', 'web', 'phone', 'kiosk'])],
]);

export const exampleFacts: DatasetFacts = {
  dataset: exampleDataset,
  coverage: { firstDate: PERIOD_START, lastDate: PERIOD_END, rows: 200_000 },
  values: exampleValues,
  stamp: 'daily',
};
