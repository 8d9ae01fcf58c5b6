/**
 * A key path the way the policy is written: `checks.leakage.action`, list items as `[2]` (counted
 * from 0), and names that are not plain words quoted: `data.columns['order id']`.
 * The empty path is the top level and formats as ''.
 */
export function formatKeyPath(path: readonly (string | number | symbol)[]): string {
  let text = ''
  for (const segment of path) {
    if (typeof segment === 'number') text += `[${segment}]`
    else if (/^[A-Za-z_][A-Za-z0-9_-]*$/.test(String(segment))) text += text ? `.${String(segment)}` : String(segment)
    else text += `['${String(segment).replaceAll('\\', '\\\\').replaceAll("'", "\\'")}']`
  }
  return text
}
