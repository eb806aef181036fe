// Sub-question "segment_shares": the trend request's distribution lens.
import { presentSegmentShares } from '../present/trend-segment-shares.js';
import { segmentSharesTemplate } from '../templates/segments-shares.js';
import { namedSegmentCount } from '../templates/segments-fold-sql.js';
import { pluralNoun } from '../captions/grammar.js';
import { defineSubQuestion } from './definition.js';

export const segmentSharesSubQuestion = defineSubQuestion({
  name: 'segment_shares',
  kind: 'trend',
  lens: 'distribution',
  rollup: {},
  template: segmentSharesTemplate,
  present: presentSegmentShares,
  describe: (w, sq) =>
    sq.focus
      ? `${sq.focus.value}'s share of all ${w.metric} (${w.span}), its rank among every ${w.dim}, and how its ${w.grain} share moved.`
      : sq.rankOrder
      ? `The ${sq.rankLimit ? `${namedSegmentCount(sq)} ` : ''}${sq.rankOrder} ${pluralNoun(w.dim)} by ${w.metric} (${w.span}), ranked by its value.`
      : `Each ${w.dim}'s share of ${w.metric} (${w.span}), and how concentrated it is.`,
});
