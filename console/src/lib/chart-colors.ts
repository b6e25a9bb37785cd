/** Chart colours as literals (SVG attributes), matching the kiln accent and ash greys of index.css. */
export const chartColors = {
  accent: '#cc5a26',
  accentSoft: '#f0bfa0',
  accentDeep: '#8f3a14',
  ink: '#3f3c38',
  grey: '#9d9992',
  greyLight: '#d9d6d0',
  grid: '#ebe9e5',
  danger: '#b42318',
};

/** Several series at once (unit power lines): the accent first, then distinguishable greys and accent shades. */
export const seriesPalette = ['#cc5a26', '#3f3c38', '#8f3a14', '#9d9992', '#e0895a', '#6b6761', '#b8b4ad', '#5c2710'];
