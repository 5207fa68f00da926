/**
 * The heating fuel, price and efficiency a room's heat is priced with. One rule of precedence: the block's own
 * values, else the school's, else the trust's assumption set. A school's price and efficiency belong to the
 * school's fuel: a block heated by another fuel never takes them (an electric nursery pod in a gas-heated school
 * is priced as electricity at efficiency 1).
 */
import type { AssumedValue, AssumptionSet, BlockInput, HeatingUsed, SchoolInput } from './types';

/** The fuel, price and efficiency of a room's heating and where each came from. */
export function heatingSupply(
  block: BlockInput,
  school: SchoolInput,
  set: AssumptionSet,
  assumed: AssumedValue[],
): HeatingUsed {
  const fuel = block.heatingFuel ?? school.heatingFuel;
  const fuelSource = block.heatingFuel === null ? 'school' : 'block';
  const schoolApplies = fuel === school.heatingFuel;
  let priceGbpPerKwh: number;
  let priceSource: HeatingUsed['priceSource'];
  if (block.fuelPriceGbpPerKwh !== null) {
    priceGbpPerKwh = block.fuelPriceGbpPerKwh;
    priceSource = 'block';
  } else if (schoolApplies && school.fuelPriceGbpPerKwh !== null) {
    priceGbpPerKwh = school.fuelPriceGbpPerKwh;
    priceSource = 'school';
  } else {
    priceGbpPerKwh = set.finance.fuelPricesGbpPerKwh.value[fuel];
    priceSource = 'trust';
  }
  let efficiency: number;
  let efficiencySource: HeatingUsed['efficiencySource'];
  if (block.heatingEfficiency !== null) {
    efficiency = block.heatingEfficiency;
    efficiencySource = 'block';
  } else if (schoolApplies && school.heatingEfficiency !== null) {
    efficiency = school.heatingEfficiency;
    efficiencySource = 'school';
  } else {
    efficiency = set.energy.heatGeneratorEfficiency.value[fuel];
    efficiencySource = 'trust';
    assumed.push({
      field: 'heating.efficiency',
      value: efficiency,
      reason: "not recorded: the trust's default for the fuel",
    });
  }
  return {
    fuel,
    fuelSource,
    priceGbpPerKwh,
    priceSource,
    efficiency,
    efficiencySource,
    carbonKgCo2ePerKwh: set.finance.carbonFactorsKgCo2ePerKwh.value[fuel],
  };
}
