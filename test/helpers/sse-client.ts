// Reads a server-sent event stream over fetch and keeps every event, for tests.
export interface SseEvent {
  id?: string;
  event: string;
  data: string;
}

export class SseClient {
  readonly events: SseEvent[] = [];
  private readonly abort = new AbortController();
  private done: Promise<void> = Promise.resolve();

  async open(url: string, headers: Record<string, string> = {}): Promise<Response> {
    const res = await fetch(url, { headers: { accept: 'text/event-stream', ...headers }, signal: this.abort.signal });
    if (!res.body) throw new Error('no event stream body');
    this.done = this.read(res.body).catch(() => undefined);
    return res;
  }

  close(): Promise<void> {
    this.abort.abort();
    return this.done;
  }

  private async read(body: ReadableStream<Uint8Array>): Promise<void> {
    const decoder = new TextDecoder();
    let buffer = '';
    for await (const chunk of body as unknown as AsyncIterable<Uint8Array>) {
      buffer += decoder.decode(chunk, { stream: true });
      let end: number;
      while ((end = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, end);
        buffer = buffer.slice(end + 2);
        const e: SseEvent = { event: 'message', data: '' };
        const data: string[] = [];
        for (const line of block.split('\n')) {
          if (line.startsWith(':')) continue;
          const [field, ...rest] = line.split(':');
          const value = rest.join(':').replace(/^ /, '');
          if (field === 'id') e.id = value;
          else if (field === 'event') e.event = value;
          else if (field === 'data') data.push(value);
        }
        if (data.length) this.events.push({ ...e, data: data.join('\n') });
      }
    }
  }
}
