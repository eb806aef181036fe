// A comparison group made of one breakdown's values (`when: {column: series, one_of: [...]}`) on
// open data: vega-datasets unemployment-across-industries.json (US BLS monthly unemployed counts
// for 14 industries, January 2000 to February 2010). The group and its turning date are ours, for
// the test (no event is claimed for that date). Checked:
// - naming the group's own members ("at Construction, Manufacturing, …") names one side of the
//   comparison, so it is no filter that would leave nothing to compare with, and the card says so;
// - "since" the group's launch date is the launch, not a window with no before period;
// - the plan never compares the groups within the breakdown the group is made of (each industry is
//   all members or all others), whether asked for or chosen by default.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import { briefToJson } from '../../bot/reading/brief-json.js';
import { buildPlan } from '../../bot/plan.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { publicFacts, UNEMPLOYMENT_CONFIG } from './public-data.js';

const GOODS = ['Agriculture', 'Construction', 'Manufacturing', 'Mining and Extraction'];
const config = join(mkdtempSync(join(tmpdir(), 'tc-programme-')), 'unemployment-groups.yaml');
writeFileSync(
  config,
  `${readFileSync(UNEMPLOYMENT_CONFIG, 'utf8')}    comparison_groups:
      - name: goods
        label: Goods sector
        also_called: [goods producers, goods-producing industries, the goods sector]
        when: {column: series, one_of: [${GOODS.join(', ')}]}
        members_label: Goods-producing industries
        others_label: other industries
        launch_date: "2008-09-01"
`,
);

let facts: DatasetFacts;
beforeAll(async () => {
  facts = await publicFacts(config);
}, 120_000);

const NOW = new Date('2026-12-05T01:00:00Z');
const brief = (text: string) => readRequest(text, facts, { now: NOW, locale: 'en-IE' });
const read = (text: string) => briefToJson(brief(text), 'unemployment_across_industries');
const plan = (text: string) => {
  const b = brief(text);
  return buildPlan(withDefaults(b, briefDefaults(b, facts.dataset, facts.coverage)), facts.dataset, facts.coverage);
};

describe("naming a group's members keeps the comparison", () => {
  it('reads the members named as the group, not a filter, and the launch date as the launch', () => {
    const b = read('Impact of the goods sector on unemployed at Agriculture, Construction, Manufacturing and Mining and Extraction since 1 Sept 2008');
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ kind: 'performance', comparisonGroup: 'goods', filters: [], launchDate: '2008-09-01', window: null });
    expect(b.saidBack).toContainEqual('Agriculture, Construction, Manufacturing and Mining and Extraction are the Goods-producing industries, so I compare them with other industries rather than keep to them.');
  });

  it('says so when one member is named, and compares the whole group', () => {
    const b = read('did the goods producers do worse than the rest on unemployment in Construction?');
    expect(b.questions[0]).toMatchObject({ kind: 'performance', comparisonGroup: 'goods', filters: [] });
    expect(b.saidBack?.join(' ')).toMatch(/Construction is among the Goods-producing industries; kept to it there would be nothing to compare with/);
  });

  it('keeps a filter on another breakdown value that leaves both sides', () => {
    // Government is one of the others, Construction a member: both sides stay, so the filter stays.
    const b = read('goods sector vs the rest, unemployed, Construction and Government only');
    expect(b.questions[0]!.filters).toEqual([{ dimension: 'series', values: ['Construction', 'Government'] }]);
  });
});

describe('never within the breakdown the group is made of', () => {
  it.each([
    'goods producers vs other industries by industry: unemployed before and after the launch',
    'did the goods sector do better than the rest on unemployed?',
  ])('%s', (text) => {
    const items = plan(text).items;
    expect(items.some((i) => i.template === 'performance_before_after' && i.comparisonGroup === 'goods')).toBe(true);
    expect(items.filter((i) => i.template === 'performance_by_segment' && i.dimension === 'series')).toEqual([]);
  });
});
