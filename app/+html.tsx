import { ScrollViewStyleReset, useServerDocumentContext } from 'expo-router/html';
import type { ReactNode } from 'react';
import { palette } from '@/theme/palette';

/**
 * The document every page is drawn into on the server: Expo Router's own, plus the page title
 * and the colours a phone uses for its browser bar. Runs on the server only.
 */
export default function Document({ children }: { children: ReactNode }) {
  const { bodyAttributes, bodyNodes, htmlAttributes, headNodes } = useServerDocumentContext();
  return (
    <html lang="en" {...htmlAttributes}>
      <head>
        <meta charSet="utf-8" />
        <meta httpEquiv="X-UA-Compatible" content="IE=edge" />
        <meta name="viewport" content="width=device-width, initial-scale=1, shrink-to-fit=no" />
        <meta name="theme-color" content={palette.moss800} />
        <meta name="description" content="Lead-by-lead records and forecasts for growers of sympodial orchids" />
        <title>Sympodia</title>
        <ScrollViewStyleReset />
        {headNodes}
      </head>
      <body {...bodyAttributes}>
        {children}
        {bodyNodes}
      </body>
    </html>
  );
}
