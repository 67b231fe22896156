/** Bundles the explore page's script; returns its text (and writes it to `outfile` when given). */
export function bundleExplorePage(outfile?: string): Promise<string>;
