// jsdom has no ResizeObserver; chart and layout components ask for one.
class ResizeObserverStandIn {
  observe(): void {
    // jsdom lays nothing out, so there is never a size change to report.
  }
  unobserve(): void {
    // Nothing was observed.
  }
  disconnect(): void {
    // Nothing to let go of.
  }
}
// Only the methods components call exist here.
if (!('ResizeObserver' in globalThis)) {
  globalThis.ResizeObserver = ResizeObserverStandIn;
}
