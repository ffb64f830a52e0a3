/**
 * The report's look: the palette of src/styles/global.css (iron blues, brass accent, the
 * three verdict colours) and the type scale. One place, so the PDF matches the app.
 */
export const colours = {
  iron50: '#f2f5f8',
  iron100: '#e1e7ee',
  iron200: '#c3cfdc',
  iron400: '#6f86a0',
  iron600: '#3b5370',
  iron700: '#2b3f57',
  iron800: '#1d2c3f',
  iron900: '#121c29',
  brass100: '#fbefd5',
  brass400: '#e0a634',
  brass500: '#c98b16',
  brass700: '#8a5c08',
  paper: '#f8f7f3',
  white: '#ffffff',
  clear: '#1f7a45',
  remedy: '#9a5b00',
  withdraw: '#b3261e',
} as const;

export const verdictColour = {
  clear: colours.clear,
  remedy: colours.remedy,
  withdraw: colours.withdraw,
} as const;

export const severityColour = {
  critical: colours.withdraw,
  major: colours.remedy,
  minor: colours.iron600,
} as const;

export const type = {
  title: 22,
  heading: 14,
  subheading: 11,
  body: 9.5,
  small: 8,
  tiny: 7,
} as const;
