// The SQL as it ran, with its bound values listed beside it, for users to read and rerun.
import type { CompiledQuery } from '../types.js';

export function sqlForReaders(q: CompiledQuery, dialectName: string): string {
  const params = q.params.map((p, i) => `--   $${i + 1} = ${JSON.stringify(p)}`).join('\n');
  return `-- ${dialectName} SQL, run with bound parameters${params ? `:\n${params}` : ' (none)'}\n${q.sql};\n`;
}
