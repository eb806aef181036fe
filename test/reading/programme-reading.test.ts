// Questions about a programme (a comparison group of the catalog) read as what they ask: whether
// it worked, in any register, is a performance question on that group, so the plan sets its
// members against the rest before and after the launch; a group named with nothing set against it
// is said back on the card, never dropped silently. On the demo catalog (SkerryPass: pass
// holders, launched 1 April 2023, per config/examples/skerrywake.yaml); the requests are our own.
import { describe, expect, it } from 'vitest';
import { briefToJson } from '../../bot/reading/brief-json.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { exampleFacts } from '../helpers/example-facts.js';

const NOW = new Date('2025-06-20T09:00:00Z');
const read = (text: string) => briefToJson(readRequest(text, exampleFacts, { now: NOW, locale: 'en-IE' }), 'bookings');

describe('whether a programme worked', () => {
  it.each([
    ['did skerrypass work?', []],
    ['Did the pass programme work for revenue? before and after pls', ['revenue']],
    ['has the commuter pass made any difference to bookings', ['bookings']],
    ['Was SkerryPass a success? Revenue please.', ['revenue']],
    ["we're reviewing the pass program - is it paying off in bookings?", ['bookings']],
    ['Could you tell me whether the SkerryPass scheme has worked, in terms of passengers, before and after it launched?', ['passengers']],
    ['skerry pass any good for revenue??', ['revenue']],
    ['revenue by pass holder', ['revenue']],
  ])('%s: one performance question on SkerryPass', (text, metrics) => {
    const b = read(text);
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ kind: 'performance', comparisonGroup: 'skerrypass', metrics });
  });

  it('takes a trailing "before and after the launch" as the launch of the group the question named, not as context to drop', () => {
    const b = read('How are pass holders doing on bookings? Before and after the launch please.');
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ kind: 'performance', comparisonGroup: 'skerrypass', launchDate: '2023-04-01', metrics: ['bookings'] });
  });

  it('says back a group named with nothing set against it, and how to ask for the comparison', () => {
    const b = read('revenue for pass holders by month');
    expect(b.questions[0]).toMatchObject({ kind: 'trend', comparisonGroup: null });
    const note = (b.saidBack ?? []).find((n) => n.includes('SkerryPass'));
    expect(note).toMatch(/sets them against nothing/);
    expect(note).toMatch(/Pass holders vs Other customers/);
  });

  it("says a group's own growth is not measured, rather than answer the company's growth silently", () => {
    const b = read('did the pass holders grow faster this year? revenue');
    expect(b.questions[0]).toMatchObject({ kind: 'growth', comparisonGroup: null, metrics: ['revenue'] });
    expect((b.saidBack ?? []).join(' ')).toMatch(/I do not measure each group's own growth yet, so I read it as growth over all the data/);
  });

  it('leaves a plain question with no group alone', () => {
    const b = read('did the app work better than web for bookings last year?');
    expect(b.questions[0]!.comparisonGroup).toBeNull();
    expect(b.saidBack ?? []).not.toContainEqual(expect.stringContaining('SkerryPass'));
  });
});
