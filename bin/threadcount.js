#!/usr/bin/env node
// Runs the compiled CLI (npm run build writes dist/).
import('../dist/cli/main.js').then(
  (m) =>
    m.main(process.argv.slice(2)).then(
      (code) => process.exit(code),
      (err) => {
        console.error(`threadcount: ${err instanceof Error ? err.message : String(err)}`);
        process.exit(1);
      },
    ),
  (err) => {
    // A fresh clone has no dist/ yet: say how to make it rather than print a module path.
    const notBuilt = err && err.code === 'ERR_MODULE_NOT_FOUND' && String(err.message).includes('dist');
    console.error(notBuilt ? 'threadcount: not built yet; run `npm run build` (or `npm start`) in the clone first' : `threadcount: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(notBuilt ? 2 : 1);
  },
);
