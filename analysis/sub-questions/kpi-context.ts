// Sub-question "kpi_context": the KPI snapshot request's summary lens.
import { presentKpiContext } from '../present/kpi-context.js';
import { kpiContextTemplate } from '../templates/kpi-context.js';
import { defineSubQuestion } from './definition.js';

export const kpiContextSubQuestion = defineSubQuestion({
  name: 'kpi_context',
  kind: 'kpi',
  lens: 'summary',
  rollup: {},
  template: kpiContextTemplate,
  present: presentKpiContext,
  drawsSeriesLine: true,
  describe: (w, sq) => `How the latest ${sq.grain} of ${w.metric} compares with its whole history.`,
});
