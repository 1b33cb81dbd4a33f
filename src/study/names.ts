/** The file-name stem of a study's reports and level folders: the name with anything but letters, digits,
 *  '.', '_' and '-' replaced (study names are validated to that alphabet already; this guards other callers). */
export function fileStem(study: string): string {
  const stem = study.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^[.-]+/, '');
  return stem === '' ? 'study' : stem;
}
