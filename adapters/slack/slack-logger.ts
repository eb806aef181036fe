// Bolt's log lines (a failed signature check, a dropped connection) go to threadcount's log.
import { LogLevel, type Logger } from '@slack/bolt';

export function slackLogger(log: (line: string) => void): Logger {
  let level = LogLevel.WARN;
  const rank = [LogLevel.DEBUG, LogLevel.INFO, LogLevel.WARN, LogLevel.ERROR];
  const at = (l: LogLevel) => (...msg: unknown[]) => {
    if (rank.indexOf(l) >= rank.indexOf(level)) log(`slack: ${msg.map((m) => (m instanceof Error ? m.message : String(m))).join(' ')}`);
  };
  return {
    debug: at(LogLevel.DEBUG),
    info: at(LogLevel.INFO),
    warn: at(LogLevel.WARN),
    error: at(LogLevel.ERROR),
    setLevel: (l) => void (level = l),
    getLevel: () => level,
    setName: () => undefined,
  };
}
