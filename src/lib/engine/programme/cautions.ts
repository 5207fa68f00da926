/** The cautions every programme page, export, board report and bid pack carries. */
import { ENGINE_CAUTIONS } from '../assess';

export const PROGRAMME_CAUTIONS: readonly string[] = [
  ...ENGINE_CAUTIONS,
  'The figures are screening estimates from a model of each room, not measurements; check the rooms at the top of the programme with CO2 monitor readings before committing money.',
  'Costs are planning estimates — the installed prices of the trust’s own unit catalogue with on-costs at the trust’s rates — not quotations or tenders; agree budgets with the trust’s cost adviser.',
  'Before any work is specified or installed, defer to local building regulations, school guidance and a competent, licensed engineer, who designs and commissions it.',
];
