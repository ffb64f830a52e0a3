/**
 * Outdoor (high-contrast) mode: a choice kept on this device in localStorage and shown as the
 * `outdoor` class on <html>. Base.astro applies it before the page paints (an inline script with
 * the same key); the toggle buttons (`[data-outdoor-toggle]`) switch it and say its state.
 */
export const OUTDOOR_STORAGE_KEY = 'latchwell:outdoor';
export const OUTDOOR_CLASS = 'outdoor';

export function outdoorModeOn(): boolean {
  return document.documentElement.classList.contains(OUTDOOR_CLASS);
}

export function setOutdoorMode(on: boolean): void {
  document.documentElement.classList.toggle(OUTDOOR_CLASS, on);
  try {
    if (on) localStorage.setItem(OUTDOOR_STORAGE_KEY, '1');
    else localStorage.removeItem(OUTDOOR_STORAGE_KEY);
  } catch {
    // Storage refused (private mode): the choice lasts for this page only.
  }
  for (const button of document.querySelectorAll<HTMLButtonElement>('[data-outdoor-toggle]'))
    button.setAttribute('aria-pressed', String(on));
}

export function wireOutdoorToggles(): void {
  for (const button of document.querySelectorAll<HTMLButtonElement>('[data-outdoor-toggle]')) {
    button.setAttribute('aria-pressed', String(outdoorModeOn()));
    button.addEventListener('click', () => setOutdoorMode(!outdoorModeOn()));
  }
}
