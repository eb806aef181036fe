// The bot's light markdown as Slack mrkdwn: *bold* and _italic_ are already Slack's; "- " list
// lines become bullets; &, < and > must be escaped or Slack reads them as control sequences.
export function toMrkdwn(text: string): string {
  return text
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/^(\s*)- /gm, '$1• ');
}

/** Text of a message as a person typed it: mentions of the bot removed, entities decoded. */
export function fromSlackText(text: string, botUserId: string | undefined): string {
  const withoutBot = botUserId ? text.replaceAll(`<@${botUserId}>`, ' ') : text.replace(/^\s*<@[A-Z0-9]+>/, ' ');
  return withoutBot
    .replace(/<(https?:[^|>]+)(?:\|[^>]*)?>/g, '$1')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&amp;/g, '&')
    .replace(/\s+/g, ' ')
    .trim();
}

export { chunks } from '../text-chunks.js';
