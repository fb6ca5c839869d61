/** The full-tab view shows the log when its address says `?view=log` (main.tsx routes on this). */
export const isLogRoute = () => new URLSearchParams(location.search).get('view') === 'log';
