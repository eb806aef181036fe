// Collects bound parameters while a template writes its SQL, so values never enter the text.
import type { CompiledQuery } from '../types.js';
import type { Dialect } from './dialect.js';

export class QueryBuilder {
  private readonly params: (string | number | boolean)[] = [];
  /** Named relations the statement reads, put in front of it as CTEs by `finish`. */
  private readonly relations = new Map<string, string>();
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

  finish(sql: string): CompiledQuery {
    return { sql: withRelations(sql.trim(), this.relations, this.dialect), params: [...this.params] };
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
