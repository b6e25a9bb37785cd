/** Invented demo sites for the console's templates and the seed data. Every one validates and solves. */
import islandMicrogrid from '../examples/island-microgrid.json' with { type: 'json' };
import gridElectrolyser from '../examples/grid-electrolyser.json' with { type: 'json' };
import solarPumpStation from '../examples/solar-pump-station.json' with { type: 'json' };
import type { SiteSpec } from './site-spec';

export interface ExampleSite {
  id: string;
  title: string;
  description: string;
  spec: SiteSpec;
}

export const exampleSites: ExampleSite[] = [
  {
    id: 'solar-pump-station',
    title: 'Solar-fed irrigation pump station',
    description:
      'An off-grid pump station on a hillside: 220 kWp of solar, a main and a booster pump that run as flexible loads ' +
      'with minimum stable flow and minimum run times, a small battery that must end the day where it started. ' +
      '48 half-hour steps.',
    spec: solarPumpStation as unknown as SiteSpec,
  },
  {
    id: 'island-microgrid',
    title: 'Island microgrid with a generator',
    description:
      'A village microgrid without a grid connection: a hard site load peaking in the evening, rooftop solar, a ' +
      'diesel-style generator with minimum up/down times that is already running, an ice maker as a flexible load ' +
      'and a battery. Two days at hourly steps.',
    spec: islandMicrogrid as unknown as SiteSpec,
  },
  {
    id: 'grid-electrolyser',
    title: 'Grid-tied electrolyser with a battery',
    description:
      'A 1 MW electrolyser next to a wind farm, grid-connected with hourly import and export prices (briefly negative ' +
      'at night), a battery with a final SOC target and a small auxiliary load that may go unserved at a penalty. ' +
      '36 hourly steps.',
    spec: gridElectrolyser as unknown as SiteSpec,
  },
];
