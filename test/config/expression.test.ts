// Config expressions: what parses, what is refused, and that SQL is written from the parsed tree
// (quotes doubled, functions from the allow-list) rather than from the text. The grammar is
// PostgreSQL's (parsed by pgsql-ast-parser); the refusals follow our allow-list.
import { describe, expect, it } from 'vitest';
import { expressionColumns, expressionText, ExpressionError, parseExpression } from '../../config/expression.js';
import { expressionSql } from '../../analysis/sql/expression-sql.js';
import { duckdbDialect } from '../../analysis/sql/dialect.js';
import { postgresDialect } from '../../analysis/sql/postgres-dialect.js';
import { ConfigError, parseConfigText } from '../../config/load.js';

const refused = (text: string) => {
  try {
    parseExpression(text);
  } catch (err) {
    expect(err).toBeInstanceOf(ExpressionError);
    return (err as Error).message;
  }
  throw new Error(`"${text}" was accepted`);
};

describe('parseExpression', () => {
  it('reads columns, arithmetic, comparisons, CASE and allowed functions, keeping a name as written', () => {
    const e = parseExpression('Ticket_EUR + "extras eur"');
    expect(expressionColumns(e)).toEqual(['Ticket_EUR', 'extras eur']);
    expect(expressionText(e)).toBe('Ticket_EUR + "extras eur"');
    expect(expressionText(parseExpression('isodow(visit_day) <= 5'))).toBe('isodow(visit_day) <= 5');
    expect(expressionText(parseExpression("CASE WHEN wind > 5 THEN 'windy' ELSE 'calm' END"))).toBe("case when wind > 5 then 'windy' else 'calm' end");
    expect(expressionText(parseExpression("site IN ('A', 'B''s')"))).toBe("site in ('A', 'B''s')");
    expect(expressionText(parseExpression('extract(month from d)'))).toBe('month(d)');
  });

  it('refuses sub-queries, statements, parameters, qualified names, aggregates and unknown functions', () => {
    expect(refused('a; drop table x')).toMatch(/not a valid expression/);
    expect(refused('(select password from users)')).toMatch(/sub-query/);
    expect(refused('$1')).toMatch(/parameter/);
    expect(refused('users.password')).toMatch(/write the column name alone/);
    expect(refused('sum(fare)')).toMatch(/function sum, which is not allowed.*added up/);
    expect(refused('pg_sleep(10)')).toMatch(/function pg_sleep, which is not allowed/);
    expect(refused('current_setting(\'x\')')).toMatch(/not allowed/);
    expect(refused('round(a, 1, 2)')).toMatch(/round with 3 arguments/);
    expect(refused('cast(a as regclass)')).toMatch(/type that is not allowed/);
    expect(refused('')).toMatch(/empty/);
  });

  it('writes SQL from the tree: identifiers quoted with quotes doubled, strings with quotes doubled', () => {
    const e = parseExpression('"a""b" || \'it\'\'s\'');
    expect(expressionSql(e, duckdbDialect)).toBe(`("a""b" || 'it''s')`);
    const div = parseExpression('a / b');
    expect(expressionSql(div, postgresDialect)).toBe('(CAST("a" AS DOUBLE PRECISION) / NULLIF(CAST("b" AS DOUBLE PRECISION), 0))');
    expect(expressionSql(parseExpression('round(x, 2)'), postgresDialect)).toBe('CAST(ROUND(CAST("x" AS NUMERIC), CAST(2 AS INTEGER)) AS DOUBLE PRECISION)');
  });
});

const base = (metrics: string, extra = '') => `version: 1
datasets:
  - name: visits
    label: Visits
    source: { kind: csv, path: visits.csv }
    time_column: visit_day
    timezone: UTC
${extra}    metrics:
${metrics}`;

function problems(text: string) {
  try {
    parseConfigText(text, 'visits.yaml');
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError);
    return (err as ConfigError).problems;
  }
  throw new Error('expected a ConfigError');
}

describe('metrics, dimensions and groups as expressions', () => {
  it('turns expressions into computed columns and plain columns into columns', () => {
    const c = parseConfigText(
      base(
        `      - { name: takings, label: Takings, sum: ticket_eur + extras_eur, unit: currency, currency: EUR, higher_is_better: true }
      - { name: tickets, label: Tickets, sum: '"ticket count"', unit: count, higher_is_better: true, when: "isodow(visit_day) <= 5" }
      - { name: visits, label: Visits, count: rows, unit: count, higher_is_better: true }
      - { name: per_visit, label: Per visit, ratio: { of: takings, per: visits }, unit: currency, currency: EUR, higher_is_better: true }
      - { name: wet_share, label: Wet share, rate: { when: { column: rain_mm, above: 0 } }, unit: percent, higher_is_better: false }
`,
        `    dimensions:
      - { name: weekday, label: Weekday, expr: "isodow(visit_day) <= 5" }
      - { name: site, label: Site, column: site name }
    comparison_groups:
      - { name: coast, label: Coastal sites, when: { column: site name, one_of: [Skerry Point, Harbour] }, members_label: Coast, others_label: Inland }
`,
      ),
      'visits.yaml',
    );
    const ds = c.datasets[0]!;
    expect(ds.table).toBe('visits');
    expect(ds.metrics[0]!.definition).toEqual({ type: 'sum', column: 'ticket_eur + extras_eur' });
    expect(ds.metrics[1]!.definition).toEqual({ type: 'sum', column: 'ticket count', where: { column: 'isodow(visit_day) <= 5', op: 'is_true' } });
    expect(ds.metrics[3]!.definition).toEqual({ type: 'ratio', numerator: 'takings', denominator: 'visits' });
    expect(ds.metrics[4]!.definition).toEqual({ type: 'rate', where: { column: 'rain_mm', op: 'gt', value: 0 } });
    expect(ds.dimensions[0]!.column).toBe('isodow(visit_day) <= 5');
    expect(ds.dimensions[1]!.column).toBe('site name');
    expect(ds.comparison_groups[0]!.column).toBe(`"site name" in ('Skerry Point', 'Harbour')`);
    expect(ds.derived!.map((d) => d.name).sort()).toEqual([`"site name" in ('Skerry Point', 'Harbour')`, 'isodow(visit_day) <= 5', 'ticket_eur + extras_eur']);
    expect(c.warnings).toEqual([]);
  });

  it('builds the time column from parts', () => {
    const c = parseConfigText(
      base('      - { name: n, label: N, count: rows, unit: count, higher_is_better: true }\n').replace('time_column: visit_day', 'time_column: { year: Year, month: Month, day: Day }'),
      'visits.yaml',
    );
    expect(c.datasets[0]!.time_column).toBe('make_date(Year, Month, Day)');
  });

  it('names the file, line and key of a bad expression, an unknown function and a personal column used as a metric', () => {
    const text = base(
      `      - name: takings
        label: Takings
        sum: ticket_eur +
        unit: number
        higher_is_better: true
      - name: odd
        label: Odd
        average: pg_sleep(ticket_eur)
        unit: number
        higher_is_better: true
      - name: emails
        label: Emails
        count_distinct: lower(email)
        unit: count
        higher_is_better: true
`,
      `    dimensions:
      - { name: email, label: Email, column: email, personal_data: true }
`,
    );
    const ps = problems(text);
    const line = (needle: string) => text.split('\n').findIndex((l) => l.includes(needle)) + 1;
    expect(ps).toHaveLength(3);
    expect(ps[0]).toMatchObject({ file: 'visits.yaml', key: 'datasets[0].metrics[0].sum', line: line('sum: ticket_eur +') });
    expect(ps[0]!.message).toMatch(/is not a valid expression/);
    expect(ps[1]).toMatchObject({ key: 'datasets[0].metrics[1].average', line: line('average: pg_sleep') });
    expect(ps[1]!.message).toMatch(/function pg_sleep, which is not allowed/);
    expect(ps[2]).toMatchObject({ key: 'datasets[0].metrics[2].count_distinct', line: line('count_distinct: lower(email)') });
    expect(ps[2]!.message).toMatch(/reads email, which is marked personal data/);
  });

  it('loads the earlier keys with a warning naming the new ones', () => {
    const text = base(
      `      - name: revenue
        label: Revenue
        synonyms: [sales]
        definition: { type: sum, column: fare, where: { column: channel, op: eq, value: web } }
        unit: number
        higher_is_better: true
`,
    );
    const c = parseConfigText(text, 'old.yaml');
    expect(c.datasets[0]!.metrics[0]).toMatchObject({ synonyms: ['sales'], definition: { type: 'sum', column: 'fare', where: { column: 'channel', op: 'eq', value: 'web' } } });
    const w = c.warnings!.map((x) => `${x.key}: ${x.message}`);
    expect(w).toHaveLength(3);
    expect(w).toEqual(expect.arrayContaining([
      expect.stringMatching(/^datasets\[0\]\.metrics\[0\]\.synonyms: .*write `also_called`/),
      expect.stringMatching(/^datasets\[0\]\.metrics\[0\]\.definition\.where\.op: .*write `is: …`/),
      expect.stringMatching(/^datasets\[0\]\.metrics\[0\]\.definition: .*write `sum: fare`/),
    ]));
  });

  it('asks for exactly one way of adding up, and exactly one test in words', () => {
    const ps = problems(
      base(`      - { name: a, label: A, sum: x, average: x, unit: number, higher_is_better: true }
      - { name: b, label: B, unit: number, higher_is_better: true }
      - { name: c, label: C, count: rows, when: { column: k, is: 1, above: 2 }, unit: number, higher_is_better: true }
`),
    );
    expect(ps.map((p) => p.key)).toEqual(['datasets[0].metrics[0].average', 'datasets[0].metrics[1]', 'datasets[0].metrics[2].when']);
  });
});
