import { InputError } from '@loopwright/lti';
import { checkCodeName, coefficientsText } from './codegen-common.ts';
import { generateC } from './codegen-c.ts';
import { generateStructuredText } from './codegen-st.ts';
import type { DiscreteController } from './controller.ts';

export const EXPORT_LANGUAGES = ['c', 'st', 'coefficients'] as const;
export type ExportLanguage = (typeof EXPORT_LANGUAGES)[number];

/** One generated file: a suggested file name and its text. */
export interface ExportedFile {
  path: string;
  text: string;
}

/**
 * The files to implement a sampled controller: 'c' → `<name>.h` + `<name>.c`; 'st' →
 * `<name>.st` (one function block); 'coefficients' → `<name>.txt` (the difference equation and
 * coefficients in plain text).
 */
export function exportController(c: DiscreteController, lang: ExportLanguage, name = 'controller'): ExportedFile[] {
  checkCodeName(name);
  switch (lang) {
    case 'c': {
      const g = generateC(c, name);
      return [g.header, g.source];
    }
    case 'st':
      return [generateStructuredText(c, name)];
    case 'coefficients':
      return [{ path: `${name}.txt`, text: coefficientsText(c, name) }];
    default:
      throw new InputError(`lang: "${lang as string}" is not one of ${EXPORT_LANGUAGES.join(', ')}`, { field: 'lang' });
  }
}
