// Dates in a dataset's time zone: "today" for a request is the calendar date where the data lives.

// Building an Intl formatter costs far more than using one; every request formats a date.
const isoDateFormats = new Map<string, Intl.DateTimeFormat>();

/** The calendar date of an instant in a time zone, as YYYY-MM-DD. */
export function isoDateIn(d: Date, timeZone: string): string {
  let f = isoDateFormats.get(timeZone);
  if (!f) {
    // en-CA formats as YYYY-MM-DD.
    f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    isoDateFormats.set(timeZone, f);
  }
  return f.format(d);
}
