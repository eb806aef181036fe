// Sub-question "kpi_by_segment": the KPI snapshot request's breakdown lens.
import { presentKpiBySegment } from '../present/kpi-by-segment.js';
import { kpiBySegmentTemplate } from '../templates/kpi-by-segment.js';
import { defineSubQuestion } from './definition.js';

export const kpiBySegmentSubQuestion = defineSubQuestion({
  name: 'kpi_by_segment',
  kind: 'kpi',
  lens: 'breakdown',
  rollup: {},
  template: kpiBySegmentTemplate,
  present: presentKpiBySegment,
  describe: (w) => `The latest ${w.metric} by ${w.dim}, with changes on a year earlier.`,
});
