/**
 * Words for people: every label, status, verdict, count, measurement and date that a page,
 * island, report or e-mail shows, in one module. The engine's codes (`awaiting_signature`,
 * `needs_info`, rule ids) stay in the data; whatever a person reads comes from here. Pure;
 * shared by pages, islands and the server (the codes themselves are listed in
 * src/lib/rules/vocabulary.ts, which the engine keeps free of words).
 */
export * from './assessments';
export * from './audit';
export * from './dates';
export * from './gates';
export * from './humanise';
export * from './measurements';
export * from './numbers';
export * from './rulesets';
