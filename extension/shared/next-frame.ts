/**
 * Settles once the page has shown its next frame, or after 100 ms (a tab in the background shows
 * none). Self-contained: the call-up runs it in the page's frame by scripting.executeScript, after
 * the first stage, so that the panel reaches the screen before the overlay proper takes the page's
 * main thread to load. The isolated world's timers are its own: a page that overrides
 * requestAnimationFrame or setTimeout changes only its own.
 * Here, not in the overlay, so that the popup need not import the overlay.
 */
export function afterNextFrame(): Promise<void> {
  return new Promise((done) => {
    requestAnimationFrame(() => setTimeout(done, 0));
    setTimeout(done, 100);
  });
}
