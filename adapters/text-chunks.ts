// Long text in pieces a platform takes (Slack's 3,000-character sections, Discord's 2,000-character
// messages), cut at line ends where it can, so no words are lost to a limit.

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
