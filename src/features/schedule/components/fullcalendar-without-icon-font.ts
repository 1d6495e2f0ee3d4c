/**
 * FullCalendar injects its CSS rule by rule into `<style data-fullcalendar>`, including an icon
 * font as a data: URL that the content security policy (fonts from 'self' only) refuses with a
 * console error on every load. We use words, not its icons (buttonIcons={false}), so we provide
 * that style element first and leave the font out; the policy stays strict. This module must be
 * imported before any @fullcalendar module: FullCalendar makes its style element on import.
 */
function styleElementWithoutIconFont() {
  if (typeof document === 'undefined' || document.querySelector('style[data-fullcalendar]')) return;
  const el = document.createElement('style');
  el.setAttribute('data-fullcalendar', '');
  document.head.prepend(el);
  const sheet = el.sheet;
  if (!sheet) return;
  const insert = sheet.insertRule.bind(sheet);
  sheet.insertRule = (rule: string, index?: number) => {
    if (/^@font-face\s*{[^}]*fcicons/.test(rule)) return sheet.cssRules.length;
    // Rules after a skipped one ask for an index one past the end.
    return insert(rule, Math.min(index ?? 0, sheet.cssRules.length));
  };
}
styleElementWithoutIconFont();
