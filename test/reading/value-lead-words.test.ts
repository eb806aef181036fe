// The leading word of a multi-word value names that value in lower case too ("nuclear" for
// "Nuclear Energy"), when no other value, measure or breakdown holds the word, and the card says
// what it was read as. Data the rule was not written around, from vega-datasets:
// iowa-electricity.csv (US EIA net generation in Iowa by source, 2001-2017), disasters.csv (Our
// World in Data deaths from natural disasters by type, 1900-2017), birdstrikes.csv and
// flights-20k.json (configs of open-data-configs.ts). Each expectation is worked out from the
// test's own SQL over the file: which values hold the word, and how many.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { readRequest, type DatasetFacts } from '../../bot/reading/read-request.js';
import { vegaDataFile } from '../helpers/open-data.js';
import { referenceRows } from '../helpers/reference-sql.js';
import { BIRDSTRIKES_CONFIG, FLIGHTS_CONFIG } from './open-data-configs.js';
import { publicFacts } from './public-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-lead-words-'));
const IOWA = join(dir, 'iowa.yaml');
const DISASTERS = join(dir, 'disasters.yaml');
writeFileSync(IOWA, `version: 1
datasets:
  - name: iowa_electricity
    label: Iowa electricity
    source: { kind: csv, paths: [${vegaDataFile('iowa-electricity.csv')}] }
    time_column: year
    timezone: UTC
    metrics:
      - { name: net_generation, label: Net generation, also_called: [generation, electricity, power, output], sum: net_generation, unit: number, unit_label: GWh, kind: flow }
    dimensions:
      - { name: source, label: Energy source, also_called: [energy source, fuel, fuel type, sources], column: source }
`);
writeFileSync(DISASTERS, `version: 1
datasets:
  - name: disasters
    label: Natural disasters
    source: { kind: csv, paths: [${vegaDataFile('disasters.csv')}] }
    time_column: { expr: "make_date(Year, 1, 1)" }
    timezone: UTC
    metrics:
      - { name: deaths, label: Deaths, also_called: [death toll, fatalities], sum: Deaths, unit: count, higher_is_better: false, kind: flow }
    dimensions:
      - { name: entity, label: Disaster type, also_called: [disaster type, disaster, disasters], expr: "case when Entity <> 'All natural disasters' then Entity end" }
`);

const facts = new Map<string, DatasetFacts>();
beforeAll(async () => {
  for (const file of [IOWA, DISASTERS, BIRDSTRIKES_CONFIG, FLIGHTS_CONFIG]) facts.set(file, await publicFacts(file));
}, 120_000);

const read = (file: string, text: string) => readRequest(text, facts.get(file)!, { now: new Date('2026-12-05T07:00:00Z'), locale: 'en-GB' });
const filtersOf = (file: string, text: string) => read(file, text).questions.flatMap((q) => q.filters);

/** The distinct values of a column whose name holds `word` as a whole word, by the test's own SQL. */
async function valuesHolding(file: string, column: string, word: string): Promise<string[]> {
  const rows = await referenceRows(
    `select distinct "${column}" as v from '${file}' where regexp_matches(lower("${column}"), '(^|[^a-z])${word}([^a-z]|$)') order by 1`,
  );
  return rows.map((r) => String(r.v));
}

describe('the leading word of one value names it', () => {
  it.each([
    ['did nuclear grow from 2005 to 2015?', 'nuclear'],
    ['is fossil generation falling?', 'fossil'],
  ])('Iowa: %s', async (text, word) => {
    // SQL over iowa-electricity.csv: exactly one source holds the word, as its first word.
    const owners = await valuesHolding(vegaDataFile('iowa-electricity.csv'), 'source', word);
    expect(owners).toHaveLength(1);
    expect(owners[0]!.toLowerCase().startsWith(`${word} `)).toBe(true);
    const brief = read(IOWA, text);
    expect(brief.questions.flatMap((q) => q.filters)).toEqual([{ dimension: 'source', values: owners }]);
    // The card says what the word was read as.
    expect(brief.saidBack ?? []).toContain(`"${word}" read as the energy source ${owners[0]}.`);
    // And its "Only:" line quotes the request's word, not the value's whole name.
    expect(brief.evidence?.filters?.words).toBe(word);
  });

  it('Disasters: "are volcanic deaths rising?" is the one type starting with it', async () => {
    const owners = await valuesHolding(vegaDataFile('disasters.csv'), 'Entity', 'volcanic');
    expect(owners).toHaveLength(1);
    expect(filtersOf(DISASTERS, 'are volcanic deaths rising?')).toEqual([{ dimension: 'entity', values: owners }]);
  });
});

describe('a word several values, a breakdown or a hyphen share names none of them', () => {
  it('Disasters: "extreme" leads two types, so "deaths from extreme events" has no filter', async () => {
    // SQL: "Extreme temperature" and "Extreme weather" both hold it.
    expect((await valuesHolding(vegaDataFile('disasters.csv'), 'Entity', 'extreme')).length).toBeGreaterThan(1);
    expect(filtersOf(DISASTERS, 'deaths from extreme events')).toEqual([]);
  });

  it('Iowa: "energy" is a word of the breakdown\'s own name, not Nuclear Energy', async () => {
    expect(await valuesHolding(vegaDataFile('iowa-electricity.csv'), 'source', 'energy')).toHaveLength(1);
    expect(filtersOf(IOWA, 'generation by energy source')).toEqual([]);
  });

  it('Birdstrikes: "take" is the first half of "Take-off run", no phase of its own', async () => {
    expect(await valuesHolding(vegaDataFile('birdstrikes.csv'), 'Phase of flight', 'take')).toEqual(['Take-off run']);
    expect(filtersOf(BIRDSTRIKES_CONFIG, 'take a look at strikes by month')).toEqual([]);
  });

  it.each(['did delays in chicago rise on the way home?', 'take a look at the late share over the spring', 'which month was worst for the main hub?'])(
    'Flights (airport codes only): %s reads no airport',
    (text) => {
      expect(filtersOf(FLIGHTS_CONFIG, text)).toEqual([]);
    },
  );
});
