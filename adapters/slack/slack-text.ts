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

/** Splits long text into pieces of at most `max` characters, at line ends where it can. */
export function chunks(text: string, max: number): string[] {
  const out: string[] = [];
  let rest = text;
  while (rest.length > max) {
    const cut = rest.lastIndexOf('\n', max);
    const at = cut > max / 2 ? cut : max;
    out.push(rest.slice(0, at));
    rest = rest.slice(at).replace(/^\n/, '');
  }
  if (rest.trim()) out.push(rest);
  return out;
}
