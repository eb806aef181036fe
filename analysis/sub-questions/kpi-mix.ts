// Sub-question "kpi_mix": the KPI snapshot request's distribution lens.
import { metricByName } from '../catalog.js';
import { presentKpiMix } from '../present/kpi-mix.js';
import { kpiMixTemplate, mixMeasure } from '../templates/kpi-mix.js';
import { defineSubQuestion } from './definition.js';

export const kpiMixSubQuestion = defineSubQuestion({
  name: 'kpi_mix',
  kind: 'kpi',
  lens: 'distribution',
  // A mix also shows each metric's base (the count or sum its shares are of).
  rollup: {
    metrics: (sq, ds) => [...new Set([...sq.metrics, ...sq.metrics.flatMap((m) => mixMeasure(ds, metricByName(ds, m))?.name ?? [])])],
  },
  template: kpiMixTemplate,
  present: presentKpiMix,
  describe: (w, sq) => `Each ${w.dim}'s share of ${w.metric} in the latest complete ${sq.grain}, against a year earlier.`,
});
