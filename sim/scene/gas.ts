// The `gas` block of a scene resolved to SI, with the built-in species table of sim/gas.

import type { Document, Node } from 'yaml';
import { fail, type Origin } from './schema.js';
import type { GasSettings } from '../gas/settings.js';
import { findGasSpecies, GAS_SPECIES_NAMES } from '../gas/species-lookup.js';

export function resolveGas(g: Record<string, any>, path: (string | number)[], doc: Document, origin: Origin): GasSettings {
  let massKg: number | undefined = g.mass;
  let pol: number | undefined = g.polarizability;
  let name = 'custom';
  if (g.species !== undefined) {
    const sp = findGasSpecies(g.species);
    if (!sp) {
      fail(origin, doc.getIn([...path, 'species'], true) as Node, [...path, 'species'],
        `expects one of ${GAS_SPECIES_NAMES.join(', ')}, or give mass and polarizability instead, got '${g.species}'`);
    }
    name = g.species;
    massKg ??= sp.massKg;
    pol ??= sp.polarizabilityM3;
  }
  if (massKg === undefined) fail(origin, doc.getIn(path, true) as Node, [...path, 'mass'], 'is required without a species (a mass such as 28 u)');
  if (pol === undefined) fail(origin, doc.getIn(path, true) as Node, [...path, 'polarizability'], 'is required without a species (a volume such as 1.74 A^3)');
  if (g.model === 'hard-sphere' && g.cross_section === undefined) {
    fail(origin, doc.getIn(path, true) as Node, [...path, 'cross_section'], 'is required for the hard-sphere model (an area such as 150 A^2)');
  }
  if (g.model === 'drag' && g.cross_section === undefined && g.reduced_mobility === undefined) {
    fail(origin, doc.getIn(path, true) as Node, [...path, 'cross_section'], 'the drag model needs cross_section (an area such as 150 A^2) or reduced_mobility (such as 2.1 cm^2/(V s))');
  }
  const out: GasSettings = {
    species: name, massKg, polarizabilityM3: pol,
    pressurePa: g.pressure, temperatureK: g.temperature, model: g.model,
  };
  if (g.cross_section !== undefined) out.crossSectionM2 = g.cross_section;
  if (g.reduced_mobility !== undefined) out.reducedMobility = g.reduced_mobility;
  return out;
}
