/*
 * The door's other half: what a page loads only when it needs it, by `import()` (the log's headline
 * figures and a case's summary take the whole engine, which its list of rows does not). Kept apart
 * from index.ts, because a page that imports the door statically would otherwise carry these too.
 * test/house/arrows.test.ts lets the extension reach src through these two files only.
 */
export { analyseCase } from './analysis';
export { caseHeadline, headlineText } from './headline';
export { summaryText } from './summary';
