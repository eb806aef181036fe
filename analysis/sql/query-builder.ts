// Collects bound parameters while a template writes its SQL, so values never enter the text.
import type { CompiledQuery, DateWindow } from '../types.js';
import type { Dialect } from './dialect.js';

export class QueryBuilder {
  private readonly params: (string | number | boolean)[] = [];
  /** Named relations the statement reads, put in front of it as CTEs by `finish`. */
  private readonly relations = new Map<string, string>();
  private readonly windows: DateWindow[] = [];
  private everyDate = false;
  private tableReads = 0;
  /** `offset`: placeholders this builder's parameters follow (for a statement that joins two). */
  constructor(
    readonly dialect: Dialect,
    private readonly offset = 0,
  ) {}

  /** Binds a value and returns its placeholder. */
  bind = (value: string | number | boolean): string => {
    this.params.push(value);
    return this.dialect.placeholder(this.offset + this.params.length);
  };

  ident = (name: string): string => this.dialect.quoteIdent(name);

  /**
   * Declares a relation the statement reads (a CTE without parameters, e.g. the dataset's rows with
   * the columns the config computes) and returns its quoted name. `finish` puts it first.
   */
  relation(name: string, sql: string): string {
    this.relations.set(name, sql);
    return this.ident(name);
  }

  /** Notes a reference to the table (or the rollup standing for it): compile-context.ts's tableRef calls it. */
  readsTable(): void {
    this.tableReads++;
  }

  /** Notes that one reference reads rows of these dates only (compile-context.ts's date conditions call it). */
  readsDates(window: DateWindow): void {
    this.windows.push({ ...window });
  }

  /** Notes that the statement reads rows of any date (e.g. the whole table's first and last day). */
  readsEveryDate(): void {
    this.everyDate = true;
  }

  /**
   * The dates every row the statement reads falls in, as one span; null when it may read any date:
   * it said so, or it has fewer date conditions than references to the table (one of them may
   * read every row, so the safe answer is "any date").
   */
  datesRead(): DateWindow | null {
    if (this.everyDate || this.windows.length === 0 || this.windows.length < this.tableReads) return null;
    let { start, end } = this.windows[0]!;
    for (const w of this.windows) {
      if (w.start < start) start = w.start;
      if (w.end > end) end = w.end;
    }
    return { start, end };
  }

  finish(sql: string): CompiledQuery {
    return { sql: withRelations(sql.trim(), this.relations, this.dialect), params: [...this.params], datesRead: this.datesRead() };
  }
}

/** The relations as CTEs in front of the statement, merged with its own WITH. */
function withRelations(sql: string, relations: Map<string, string>, dialect: Dialect): string {
  if (relations.size === 0) return sql;
  // NOT MATERIALIZED: each reader scans the table with its own filters, as it would the table itself.
  const ctes = [...relations].map(([name, body]) => `${dialect.quoteIdent(name)} AS NOT MATERIALIZED (\n  ${body.split('\n').join('\n  ')}\n)`).join(',\n');
  const own = /^WITH\s+/i.exec(sql);
  return own ? `WITH ${ctes},\n${sql.slice(own[0].length)}` : `WITH ${ctes}\n${sql}`;
}
