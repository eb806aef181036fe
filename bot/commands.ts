// Commands a person can type in a thread or the channel, in plain words.
export type Command = 'help' | 'catalog' | 'status' | 'cancel' | 'rerun';

const COMMANDS: [RegExp, Command][] = [
  [/^\s*(help|\?|what can i (ask|say)|how does this work)\s*[?!.]*\s*$/i, 'help'],
  [/\b(what can you (measure|answer)|which metrics|what metrics|list (the )?metrics|what do you know about)\b/i, 'catalog'],
  [/^\s*(status|my requests|status of my requests|what are you working on)\s*[?!.]*\s*$/i, 'status'],
  [/^\s*(cancel|stop|abort|never ?mind)( (it|this|that|the request))?\s*[.!]*\s*$/i, 'cancel'],
  [/^\s*(rerun|re-run|run (it )?again|refresh)( with fresh data)?\s*[.!]*\s*$/i, 'rerun'],
];

export function readCommand(text: string): Command | null {
  return COMMANDS.find(([re]) => re.test(text))?.[1] ?? null;
}
