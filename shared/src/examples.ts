/** Invented demo sites for the console's templates and the seed data. Every one validates and solves. */
import islandMicrogrid from '../examples/island-microgrid.json' with { type: 'json' };
import gridElectrolyser from '../examples/grid-electrolyser.json' with { type: 'json' };
import solarPumpStation from '../examples/solar-pump-station.json' with { type: 'json' };
import warehouseDemandCharge from '../examples/warehouse-demand-charge.json' with { type: 'json' };
import type { SiteSpec } from './site-spec';

export interface ExampleSite {
  id: string;
  title: string;
  description: string;
  spec: SiteSpec;
}

export const exampleSites: ExampleSite[] = [
  {
    id: 'island-microgrid',
    title: 'Island village microgrid with three gensets and a fuel tank',
    description:
      'A village grid without a connection: solar, a battery, three diesel gensets with idling (no-load) costs, part-load ' +
      'cost curves, hot and cold starts and ramp limits, all drawing on one diesel tank, an ice maker as a flexible load, ' +
      'and spinning reserve of 12 % of the load (at least 50 kW). Two days at hourly steps, local time of the island.',
    spec: islandMicrogrid as unknown as SiteSpec,
  },
  {
    id: 'solar-pump-station',
    title: 'Hillside pump station with a reservoir',
    description:
      "A town's water pumps fed by solar and a small grid connection with time-of-use prices: two pumps fill a 1 400 m3 " +
      'reservoir that loses a little to evaporation and must meet the hourly water demand and end the day where it ' +
      'started; the battery may charge from the solar only. 48 half-hour steps.',
    spec: solarPumpStation as unknown as SiteSpec,
  },
  {
    id: 'grid-electrolyser',
    title: 'Power-to-X plant with a hydrogen tank and a fuel cell',
    description:
      'A 1 MW electrolyser beside a wind farm fills a hydrogen tank against an offtake contract of 8 kg an hour (a shortfall ' +
      'costs a penalty); a fuel cell can turn hydrogen back into power. Grid import and export at hourly prices, briefly ' +
      'negative at night; a battery with a final SOC target. 36 hourly steps.',
    spec: gridElectrolyser as unknown as SiteSpec,
  },
  {
    id: 'warehouse-demand-charge',
    title: 'Distribution warehouse with a demand charge',
    description:
      'A grid-tied warehouse with rooftop solar and a battery whose bill carries a demand charge on the highest import ' +
      'between 08:00 and 20:00 on weekdays, local time, above the 300 kW already reached this month. Two days at ' +
      'half-hour steps.',
    spec: warehouseDemandCharge as unknown as SiteSpec,
  },
];
