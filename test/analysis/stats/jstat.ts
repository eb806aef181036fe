// Typed access to the parts of jStat (npm "jstat", no bundled types) that the stats tests use as a reference.
import { createRequire } from 'node:module';

export interface JStat {
  mean(values: number[]): number;
  median(values: number[]): number;
  stdev(values: number[], sample?: boolean): number;
  variance(values: number[], sample?: boolean): number;
  mode(values: number[]): number | number[];
  min(values: number[]): number;
  max(values: number[]): number;
  ztest(z: number, sides: 1 | 2): number;
  normalci(value: number, alpha: number, sd: number, n: number): [number, number];
  normal: { cdf(x: number, mean: number, sd: number): number; inv(p: number, mean: number, sd: number): number };
  (): { twoSidedDifferenceOfProportions(p1: number, n1: number, p2: number, n2: number): number };
}

export const jStat = createRequire(import.meta.url)('jstat') as JStat;
