// A brief card as the bot posts it (issue 14), for the adapter tests of every platform: the
// request restated, a line per topic, a 16-item plan (long enough to need splitting on Slack's
// sections and Discord's 2,000 characters), controls and Go/Cancel. Invented for the tests, on
// the demo scenario's words (Skerrywake Ferries).
import type { OutgoingPost, PostControl } from '../../bot/port.js';

const PLAN_ITEMS = [
  'Monthly revenue over the whole history, with the busiest and quietest months marked',
  'Whether revenue has a trend (Mann-Kendall test and Sen\'s slope), and the change since its peak',
  'Revenue\'s seasonal pattern: the best and worst months and in how many years they held',
  'Revenue by day of the week',
  'Each route\'s own revenue trend, with gaps and late starts',
  'Route shares of revenue, the count of routes making 80% and the concentration index',
  'Revenue\'s monthly summary: lowest, highest, mean, median and unusual months',
  'Growth on the month before and on the same month a year earlier',
  'Which routes drove the change on a year earlier',
  'The spread of monthly growth rates',
  'How route shares moved against a year earlier, in points',
  'The latest complete month against the one before and a year earlier',
  'The latest complete month by route',
  'Where the latest month ranks in the whole history',
  'Fare class shares of revenue against a year earlier',
  'A period table of revenue, bookings and passengers month by month',
];

export const CARD_PLAN_LINES = PLAN_ITEMS.map((t, i) => `${i + 1}. ${t}: a chart with its caption, its table as CSV and the SQL it ran`);

export const CARD_TEXT = [
  '*Here is what I understood: how has revenue moved over time, month by month, with the busiest and quietest months?*',
  '',
  '- *Audience:* managers (assumed: plain words with enough detail to act on)',
  '- *Deadline:* Thursday 10 December 2026 (read from "by next Thursday")',
  '- *Measures:* revenue (read from "revenue")',
  '- *Grain:* monthly (read from "month by month")',
  '- *Period:* all the data, January 2023 to June 2025 (assumed: the whole history shows the pattern best)',
  '- *Breakdowns:* route (assumed: the first breakdown in the catalog)',
  '- *Filters:* none',
  '',
  '*The plan*',
  ...CARD_PLAN_LINES,
  '',
  '*Left out* (say "add" and its words to bring one back): revenue per passenger by fare class; bookings by departure hour; pass holders against other customers since the pass launched; cancellations by route & month <all of them need a breakdown you did not ask for>.',
  '',
  'Say *go* to run it, or correct anything in your own words ("for leadership, weekly, only 2024, add channel, drop 3"); the choices below do the same.',
].join('\n');

export const CARD_CONTROLS: PostControl[] = [
  {
    topic: 'audience',
    label: 'Audience',
    kind: 'select',
    choices: [
      { value: 'for leadership', label: 'Leadership (headline first)' },
      { value: 'for managers', label: 'Managers (plain words with the detail)' },
      { value: 'for analysts', label: 'Analysts (tests and intervals)' },
    ],
    current: 'for managers',
  },
  { topic: 'deadline', label: 'Deadline', kind: 'date', choices: [], current: '2026-12-10', sends: 'deadline {date}' },
  {
    topic: 'grain',
    label: 'Grain',
    kind: 'select',
    choices: [
      { value: 'daily', label: 'Daily' },
      { value: 'weekly', label: 'Weekly' },
      { value: 'monthly', label: 'Monthly' },
      { value: 'quarterly', label: 'Quarterly' },
    ],
    current: 'monthly',
  },
  {
    topic: 'period',
    label: 'Period',
    kind: 'select',
    choices: [
      { value: 'all the data', label: 'All the data' },
      { value: 'only 2024', label: '2024' },
      { value: 'last 12 months', label: 'The last 12 full months' },
    ],
    // Read from the request as a span none of the choices names: no choice shows as chosen.
    current: 'since march 2024',
  },
  {
    topic: 'breakdowns',
    label: 'Breakdowns',
    kind: 'select',
    choices: [
      { value: 'by route', label: 'Route' },
      { value: 'by channel', label: 'Booking channel' },
      { value: 'by fare class', label: 'Fare class' },
      { value: 'no breakdown', label: 'No breakdown' },
    ],
    current: 'by route',
  },
];

export function briefCardPost(key = 'card'): OutgoingPost {
  return {
    key,
    text: CARD_TEXT,
    controls: CARD_CONTROLS,
    quickReplies: [
      { value: 'go', label: 'Go: run the plan', primary: true },
      { value: 'cancel', label: 'Cancel', primary: false },
    ],
  };
}

/** The card after "weekly": the grain line and the grain control's current choice changed. */
export function correctedCardPost(): Omit<OutgoingPost, 'key' | 'files'> {
  const card = briefCardPost();
  return {
    text: card.text.replace('- *Grain:* monthly (read from "month by month")', '- *Grain:* weekly (you changed it)'),
    controls: CARD_CONTROLS.map((c) => (c.topic === 'grain' ? { ...c, current: 'weekly' } : c)),
    quickReplies: card.quickReplies!,
  };
}

/** The card after "go": the same words, no controls left. */
export function agreedCardPost(): Omit<OutgoingPost, 'key' | 'files'> {
  return { text: `${CARD_TEXT.split('\n\nSay *go*')[0]}\n\nAgreed: running the plan.` };
}
