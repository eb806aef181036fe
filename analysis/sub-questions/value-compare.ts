// Sub-question "value_compare": two values of one dimension set against each other ("did phone
// grow faster than kiosk"), a performance question's summary lens without a comparison group.
import { isAdditive, metricByName } from '../catalog.js';
import { presentValueCompare } from '../present/value-compare.js';
import { valueCompareTemplate } from '../templates/value-compare.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const valueCompareSubQuestion = defineSubQuestion({
  name: 'value_compare',
  kind: 'performance',
  lens: 'summary',
  // A sum or count per day and value is all a flow needs; a mean, share or ratio reads its rows.
  rollup: { when: (sq, ds) => isAdditive(metricByName(ds, sq.metrics[0]!)) },
  template: valueCompareTemplate,
  present: presentValueCompare,
  describe: (w, sq) => {
    const [a, b] = sq.contrast?.values ?? ['', ''];
    const against = sq.compareWindow ? 'the period named' : 'the same dates a year earlier';
    if (w.ends) return `${capitalise(w.metric)}: ${a} against ${b}, ${w.ends}: each one's growth, the gap between them and a test of the gap in growth.`;
    return `${capitalise(w.metric)}: ${a} against ${b}, ${w.span} against ${against}: each one's growth, the gap between them and a test of the gap in growth.`;
  },
});
