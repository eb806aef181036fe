// Collects bound parameters while a template writes its SQL, so values never enter the text.
import type { CompiledQuery } from '../types.js';
import type { Dialect } from './dialect.js';

export class QueryBuilder {
  private readonly params: (string | number | boolean)[] = [];
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

  finish(sql: string): CompiledQuery {
    return { sql: sql.trim(), params: [...this.params] };
  }
}
