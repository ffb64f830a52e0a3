declare module 'parse-prefer-header' {
  /** RFC 7240 `Prefer` as an object of camel-cased preferences, e.g. `{ return: 'minimal' }`. */
  export default function parsePreferHeader(
    prefer: string | string[] | null | undefined,
  ): Record<string, string | true>;
}
