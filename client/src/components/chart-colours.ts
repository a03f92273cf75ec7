/** The colours every chart draws with: ink navy, the brass accent, slate, and a lighter blue for what was observed. */
export const CHART_COLOURS = {
  ink: '#14213d',
  brass: '#b08d3c',
  slate: '#4a5570',
  observed: '#3a5a8c',
};
