// The brief as `threadcount read` prints it: one JSON object, validated by this schema, with
// windows as inclusive dates. docs/reading.md says what each field means.
import { z } from 'zod';
import { addDays } from '../../analysis/periods.js';
import { GRAINS, GROWTH_RANKS, RANK_ORDERS, REQUEST_KINDS, type DateWindow } from '../../analysis/types.js';
import { ASKABLE, AUDIENCES, BRIEF_SLOTS, type Brief } from '../brief.js';

const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/);
const window = z.object({ from: isoDate, to: isoDate }).strict();

export const briefJsonSchema = z
  .object({
    dataset: z.string(),
    questions: z.array(
      z
        .object({
          text: z.string(),
          kind: z.enum(REQUEST_KINDS),
          metrics: z.array(z.string()),
          dimensions: z.array(z.string()),
          filters: z.array(z.object({ dimension: z.string(), values: z.array(z.string()), exclude: z.boolean().optional() }).strict()),
          comparisonGroup: z.string().nullable(),
          launchDate: isoDate.nullable(),
          window: window.nullable(),
          compareWindow: window.nullable(),
          spanEnds: z.enum(['year', 'quarter', 'month']).nullable(),
          contrast: z.object({ dimension: z.string(), values: z.array(z.string()) }).strict().nullable(),
          frequency: z.boolean(),
          rankLimit: z.number().int().positive().nullable(),
          rankOrder: z.enum(RANK_ORDERS).nullable(),
          growthRank: z.enum(GROWTH_RANKS).nullable(),
          ranking: z.boolean(),
          rateUnit: z.enum(['year', 'decade']).nullable(),
          perDay: z.boolean(),
          table: z.boolean(),
          statistic: z.object({ quantile: z.number(), words: z.string() }).nullable().optional(),
          /** "What share of flights does ATL have": the one value whose share of the total is asked (not a filter). */
          shareOf: z.object({ dimension: z.string(), value: z.string() }).strict().nullable().optional(),
          ownStart: z.object({ dimension: z.string(), value: z.string(), first: isoDate, entered: z.boolean() }).strict().optional(),
        })
        .strict(),
    ),
    window: window.nullable(),
    compareWindow: window.nullable(),
    grain: z.enum(GRAINS).nullable(),
    audience: z.enum(AUDIENCES).nullable(),
    deadline: isoDate.nullable(),
    /** `role`: what the words seemed to name (a measure, a breakdown, a value of the data), when the reader could tell. */
    unknownTerms: z.array(z.object({ text: z.string(), closest: z.array(z.string()), role: z.enum(['metric', 'dimension', 'value', 'other']).optional() }).strict()),
    ambiguousValues: z.array(z.object({ text: z.string(), candidates: z.array(z.object({ dimension: z.string(), value: z.string() }).strict()), versus: z.boolean().optional() }).strict()),
    personalData: z.array(z.string()),
    personalValues: z.array(z.string()),
    toAsk: z.array(z.enum(ASKABLE)),
    /** What the card says back about how the request was read (a date that is not real, a period outside the data). */
    saidBack: z.array(z.string()),
    /** Events named as a time that the data cannot date ("the recession"), asked about or said back. */
    undatedEvents: z.array(z.string()).optional(),
    anchor: z.object({ today: isoDate, why: z.string() }).strict(),
    evidence: z.partialRecord(
      z.enum(BRIEF_SLOTS),
      z.object({ words: z.string(), how: z.enum(['stated', 'inferred', 'default', 'answered']), value: z.string().optional(), reason: z.string().optional() }).strict(),
    ),
  })
  .strict();

export type BriefJson = z.infer<typeof briefJsonSchema>;

/** A half-open window as the inclusive dates people read. */
export function inclusive(w: DateWindow | undefined): { from: string; to: string } | null {
  return w ? { from: w.start, to: addDays(w.end, -1) } : null;
}

export function briefToJson(brief: Brief, dataset: string): BriefJson {
  const json: BriefJson = {
    dataset,
    questions: brief.questions.map((q) => ({
      text: q.text,
      kind: q.kind,
      metrics: q.metrics,
      dimensions: q.dimensions,
      filters: q.filters.map((f) => ({ dimension: f.dimension, values: f.values.map(String), ...(f.exclude ? { exclude: true } : {}) })),
      comparisonGroup: q.comparisonGroup ?? null,
      launchDate: q.launchDate ?? null,
      window: inclusive(q.window),
      compareWindow: inclusive(q.compareWindow),
      spanEnds: q.spanEnds ?? null,
      contrast: q.contrast ?? null,
      frequency: q.frequency,
      rankLimit: q.rankLimit ?? null,
      rankOrder: q.rankOrder ?? null,
      growthRank: q.growthRank ?? null,
      ranking: q.ranking ?? false,
      rateUnit: q.rateUnit ?? null,
      perDay: q.perDay ?? false,
      table: q.table ?? false,
      statistic: q.statistic ?? null,
      ...(q.shareOf ? { shareOf: q.shareOf } : {}),
      ...(q.ownStart ? { ownStart: q.ownStart } : {}),
    })),
    window: inclusive(brief.window),
    compareWindow: inclusive(brief.compareWindow),
    grain: brief.grain ?? null,
    audience: brief.audience ?? null,
    deadline: brief.deadline && brief.deadline !== 'none' ? brief.deadline : null,
    unknownTerms: brief.unknownTerms.map((u) => ({ text: u.text, closest: u.closest, ...(u.role ? { role: u.role } : {}) })),
    ambiguousValues: brief.ambiguousValues ?? [],
    personalData: brief.personalData ?? [],
    personalValues: brief.personalValues ?? [],
    toAsk: brief.toAsk ?? [],
    saidBack: brief.saidBack ?? [],
    ...(brief.undatedEvents?.length ? { undatedEvents: brief.undatedEvents } : {}),
    anchor: brief.anchor ?? { today: '', why: '' },
    evidence: brief.evidence ?? {},
  };
  return briefJsonSchema.parse(json);
}
