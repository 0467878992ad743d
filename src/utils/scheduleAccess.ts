/** The same rule as the server's mayEditLineSets: the director, or a rail operator the director lets edit. */
export function mayEditLineSetsAs(isAdmin: boolean, isRail: boolean, railEditsLineSets: boolean): boolean {
  return isAdmin || (isRail && railEditsLineSets);
}
