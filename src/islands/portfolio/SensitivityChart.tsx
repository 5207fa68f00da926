/** The finance page's sensitivity chart (data from the page; the chart library loads when it scrolls into view). */
import type { SensitivityCase } from '../../lib/client/portfolio';
import { LazyChart } from './LazyChart';

export default function SensitivityChart({ rows }: { rows: SensitivityCase[] }) {
  return <LazyChart data={{ kind: 'sensitivity', rows }} heightPx={300} />;
}
