import { createContext, useContext, type ReactNode } from 'react';

const FontsLoadedContext = createContext(false);

export function FontStateProvider({ loaded, children }: { loaded: boolean; children: ReactNode }) {
  return <FontsLoadedContext.Provider value={loaded}>{children}</FontsLoadedContext.Provider>;
}

export function useFontsLoaded(): boolean {
  return useContext(FontsLoadedContext);
}
