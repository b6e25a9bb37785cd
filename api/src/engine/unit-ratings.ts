import type { ResolvedSiteSpec } from '@gridwright/shared/site-spec';

/** The summed ratings of the site's generators and of its flexible loads. */
export function unitRatings(spec: ResolvedSiteSpec): { generatorKw: number; flexibleKw: number } {
  let generatorKw = 0;
  let flexibleKw = 0;
  for (const u of spec.units) {
    if (u.kind === 'generator') generatorKw += u.ratingKw;
    else flexibleKw += u.ratingKw;
  }
  return { generatorKw, flexibleKw };
}
