// A bounded memory of ids already handled, to drop a platform's redelivery of the same event.
export class SeenIds {
  private readonly ids = new Set<string>();

  constructor(private readonly capacity = 5_000) {}

  /** True the first time an id is offered, false after. */
  first(id: string): boolean {
    if (this.ids.has(id)) return false;
    this.ids.add(id);
    if (this.ids.size > this.capacity) this.ids.delete(this.ids.values().next().value!);
    return true;
  }
}
