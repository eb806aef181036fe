#!/usr/bin/env node
// Runs the compiled CLI (npm run build writes dist/).
import('../dist/cli/main.js').then((m) => m.main(process.argv.slice(2))).then(
  (code) => process.exit(code),
  (err) => {
    console.error(`threadcount: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
