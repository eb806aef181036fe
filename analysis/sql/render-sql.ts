// The SQL as it ran, with its bound values listed beside it, for users to read and rerun.
import type { NamedQuery } from '../types.js';

export function sqlForReaders(queries: NamedQuery[], dialectName: string): string {
  return queries
    .map((q) => {
      const params = q.params.map((p, i) => `--   $${i + 1} = ${JSON.stringify(p)}`).join('\n');
      return `-- ${q.name}: ${dialectName} SQL, run with bound parameters${params ? `:\n${params}` : ' (none)'}\n${q.sql};\n`;
    })
    .join('\n');
}
