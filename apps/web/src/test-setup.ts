// jsdom has no ResizeObserver; chart and layout components ask for one.
class ResizeObserverStandIn {
  observe(): void {}
  unobserve(): void {}
  disconnect(): void {}
}
globalThis.ResizeObserver ??= ResizeObserverStandIn as unknown as typeof ResizeObserver;
