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

/**
 * Several series at once (unit power lines, stacked terms): the accent first, then hues far enough
 * from it and from each other that neighbouring lines stay apart; shades of the accent alone were
 * mistaken for one another on a site with three gensets.
 */
export const seriesPalette = ['#cc5a26', '#2b6a8e', '#3f3c38', '#c79a1e', '#4f8a5b', '#8e4f9e', '#9d9992', '#8f3a14'];
