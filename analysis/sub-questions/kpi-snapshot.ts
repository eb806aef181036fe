// Sub-question "kpi_snapshot": the KPI snapshot request's time pattern lens.
import { presentKpiSnapshot } from '../present/kpi-snapshot.js';
import { kpiSnapshotTemplate } from '../templates/kpi-snapshot.js';
import { defineSubQuestion } from './definition.js';

export const kpiSnapshotSubQuestion = defineSubQuestion({
  name: 'kpi_snapshot',
  kind: 'kpi',
  lens: 'time_pattern',
  rollup: {},
  template: kpiSnapshotTemplate,
  present: presentKpiSnapshot,
  describe: (w, sq) => `Where ${w.metric} ${w.is === 'are' ? 'stand' : 'stands'} in the latest complete ${sq.grain}, against the ${sq.grain} before and a year earlier.`,
});
