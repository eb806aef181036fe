// Configs a newcomer wrote by hand from `threadcount init`'s draft for two open datasets of
// vega-datasets: flights-20k.json (US domestic flights, January to March 2001) and birdstrikes.csv
// (FAA wildlife strike reports, 1990-2002). Shared by the reading tests on those datasets.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';

export const vega = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');
const dir = mkdtempSync(join(tmpdir(), 'tc-values-'));
export const FLIGHTS_CONFIG = join(dir, 'flights.yaml');
export const BIRDSTRIKES_CONFIG = join(dir, 'birdstrikes.yaml');
writeFileSync(
  FLIGHTS_CONFIG,
  `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: json, paths: [${join(vega, 'flights-20k.json')}] }
    time_column: {expr: "strptime(date, '%Y/%m/%d %H:%M')"}
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, also_called: [flight, number of flights, flight count, departures], count: rows, unit: count, kind: flow }
      - { name: avg_delay, label: Average delay, also_called: [delay, delays, mean delay, lateness], average: delay, unit: number, unit_label: min, higher_is_better: false, kind: ratio }
      - { name: late_share, label: Share of flights late (over 15 min), also_called: [late flights, late rate, share late, delayed flights], rate: {when: "delay > 15"}, unit: percent, higher_is_better: false }
      - { name: total_delay, label: Total delay minutes, also_called: [delay minutes, total delay], sum: delay, unit: number, unit_label: min, higher_is_better: false, kind: flow }
    dimensions:
      - { name: origin, label: Origin airport, also_called: [origin, from, departure airport, origins], column: origin }
      - { name: destination, label: Destination airport, also_called: [destination, to, arrival airport, destinations], column: destination }
`,
);
writeFileSync(
  BIRDSTRIKES_CONFIG,
  `version: 1
datasets:
  - name: birdstrikes
    label: Wildlife strikes
    source: { kind: csv, paths: [${join(vega, 'birdstrikes.csv')}] }
    time_column: Flight Date
    timezone: UTC
    metrics:
      - { name: strikes, label: Strikes, also_called: [strike, bird strikes, birdstrikes, incidents, reports, number of strikes], count: rows, unit: count, higher_is_better: false, kind: flow }
      - { name: cost_repair, label: Repair cost, also_called: [repair costs, repairs], sum: '"Cost Repair"', unit: currency, currency: USD, higher_is_better: false, kind: flow }
      - { name: cost_total, label: Total cost, also_called: [cost, costs, damage cost, total costs], sum: '"Cost Total $"', unit: currency, currency: USD, higher_is_better: false, kind: flow }
    dimensions:
      - { name: airport_name, label: Airport, also_called: [airport, airports], column: Airport Name }
      - { name: effect_amount_of_damage, label: Damage, also_called: [damage, damage level], column: Effect Amount of damage }
      - { name: origin_state, label: State, also_called: [state, states], column: Origin State }
      - { name: phase_of_flight, label: Phase of flight, also_called: [phase, flight phase], column: Phase of flight }
      - { name: wildlife_size, label: Wildlife size, also_called: [size, animal size, bird size], column: Wildlife Size }
      - { name: wildlife_species, label: Species, also_called: [species, bird, birds, animal, wildlife], column: Wildlife Species }
      - { name: time_of_day, label: Time of day, also_called: [time of day, day or night], column: Time of day }
`,
);

