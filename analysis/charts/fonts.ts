// Fonts come from the dejavu-fonts-ttf package, so charts look the same on every host.
import { GlobalFonts } from '@napi-rs/canvas';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { FONT_FAMILY } from './theme.js';

let registered = false;

export function ensureFonts(): void {
  if (registered) return;
  const pkg = createRequire(import.meta.url).resolve('dejavu-fonts-ttf/package.json');
  const dir = join(dirname(pkg), 'ttf');
  for (const file of ['DejaVuSans.ttf', 'DejaVuSans-Bold.ttf']) {
    if (!GlobalFonts.registerFromPath(join(dir, file), FONT_FAMILY)) {
      throw new Error(`could not register font ${join(dir, file)}`);
    }
  }
  registered = true;
}
