/**
 * "Copy link" (the header's button), for whichever workspace is shown: put a link on the
 * clipboard and say so; where the clipboard is refused, show the link itself so it can be
 * copied by hand. The link's contents come from src/case/url.ts (docs/saving.md, "Links").
 */

/** Copy `href`; `what` names what the link opens ("this case", "the both-eyes case"). */
export function copyLink(href: string, what: string, say: (text: string) => void): void {
  const shown = () => say(`Link to ${what}: ${href}`);
  if (navigator.clipboard?.writeText) {
    navigator.clipboard.writeText(href).then(() => say(`Link to ${what} copied.`), shown);
  } else shown();
}

/** A link to this page with the given query. */
export function pageLink(query: string): string {
  return `${location.origin}${location.pathname}?${query}`;
}
