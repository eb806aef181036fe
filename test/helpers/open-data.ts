// Files of the vega-datasets package (public datasets: NOAA, FAA, Seattle weather and others), a dev
// dependency the tests read as data the project was never built around.
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

// The package's export map hides data/, so it is located from the resolved entry point's folder.
const dataFolder = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');

/** The absolute path of one file in vega-datasets' data/ folder, e.g. `vegaDataFile('seattle-weather.csv')`. */
export function vegaDataFile(name: string): string {
  return join(dataFolder, name);
}
