import type { QueryClient } from '@tanstack/react-query';
import type { ComponentType } from 'react';
import type { LoaderFunction } from 'react-router-dom';

export interface RouteModule {
  default: ComponentType;
  clientLoader?: (queryClient: QueryClient) => LoaderFunction;
  ErrorBoundary?: ComponentType;
}

/** Turns a lazily imported route module into route properties, handing its loader the shared QueryClient. */
export function toRoute(queryClient: QueryClient) {
  return ({ default: Component, clientLoader, ErrorBoundary }: RouteModule) => {
    const route: { Component: ComponentType; loader?: LoaderFunction; ErrorBoundary?: ComponentType } = { Component };
    if (clientLoader) route.loader = clientLoader(queryClient);
    if (ErrorBoundary) route.ErrorBoundary = ErrorBoundary;
    return route;
  };
}
