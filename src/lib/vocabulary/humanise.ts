/** Last resort for a code with no label yet: "needs_info" → "Needs info", never the raw code. */
export function humanise(code: string): string {
  const words = code.replace(/[_-]+/g, ' ').trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}
