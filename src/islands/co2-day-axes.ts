/** The axes the CO2-over-the-day charts share: time of day across, ppm up, criterion limits as dashed lines. */

const clock = (minute: number) =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(Math.round(minute % 60)).padStart(2, '0')}`;

/** ag-charts axes for a day of CO2 with horizontal limit lines (e.g. { label: 'Daily mean limit 1,500 ppm', ppm: 1500 }). */
export function co2DayAxes(limits: readonly { label: string; ppm: number }[], dark: boolean) {
  return {
    x: {
      type: 'number' as const,
      position: 'bottom' as const,
      nice: false,
      label: { formatter: ({ value }: { value: number }) => clock(value) },
      title: { text: 'Time of day' },
    },
    y: {
      type: 'number' as const,
      position: 'left' as const,
      min: 0,
      title: { text: 'CO2 (ppm)' },
      crossLines: limits.map((l, i) => ({
        type: 'line' as const,
        value: l.ppm,
        stroke: dark ? '#f08a83' : '#a1302b',
        lineDash: [6, 4],
        label: { text: l.label, position: i === 0 ? ('bottom-right' as const) : ('top-right' as const) },
      })),
    },
  };
}
