// Module hooks (node:module register): every import that resolves to a TypeScript file or into the
// tsx package throws, naming it. Plain JavaScript passes through untouched.
const TYPESCRIPT = /\.(ts|mts|cts|tsx)$/;

export async function resolve(specifier, context, nextResolve) {
  const result = await nextResolve(specifier, context);
  const { pathname } = new URL(result.url);
  if (TYPESCRIPT.test(pathname) || pathname.includes('/node_modules/tsx/')) {
    throw new Error(`no TypeScript at run time, yet ${specifier} resolved to ${result.url}`);
  }
  return result;
}
