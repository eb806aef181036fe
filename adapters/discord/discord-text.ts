// The bot's light markdown in Discord's dialect: Discord reads *x* as italic, so bold becomes
// **x**; _italic_ and "- " lists are the same in both.
export function toDiscordMarkdown(text: string): string {
  return text.replace(/(^|[^*\w])\*([^*\n]+)\*(?=[^*\w]|$)/gm, '$1**$2**');
}

/** A message's text without mentions of the bot, as the person meant it. */
export function fromDiscordText(text: string, botUserId: string | undefined): string {
  const mention = botUserId ? new RegExp(`<@!?${botUserId}>`, 'g') : /^\s*<@!?\d+>/;
  return text.replace(mention, ' ').replace(/\s+/g, ' ').trim();
}
