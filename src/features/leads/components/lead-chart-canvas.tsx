// The only module that imports Skia and victory-native: it is loaded lazily, after
// CanvasKit, so screens without a chart never pay for either.
import { Circle, Line as SkiaLine, useFont, vec } from '@shopify/react-native-skia';
import { AreaRange, CartesianChart, Line, Scatter } from 'victory-native';
import { View } from 'react-native';
import { palette } from '@/theme/palette';
import { chartRows, type LeadChartData } from './chart-data';

// eslint-disable-next-line @typescript-eslint/no-require-imports
const FONT = require('@expo-google-fonts/source-sans-3/400Regular/SourceSans3_400Regular.ttf');

export default function LeadChartCanvas({ data, height = 260 }: { data: LeadChartData; height?: number }) {
  const font = useFont(FONT, 13);
  const rows = chartRows(data);
  if (rows.length === 0) return null;
  return (
    <View style={{ height }} testID="lead-chart-canvas">
      <CartesianChart
        data={rows}
        xKey="day"
        yKeys={['measured', 'fit', 'lo', 'hi', 'last']}
        padding={{ left: 4, right: 12, top: 12, bottom: 4 }}
        domainPadding={{ top: 16 }}
        domain={{ y: [0] }}
        axisOptions={{
          font,
          tickCount: { x: 6, y: 5 },
          labelColor: palette.bark700,
          lineColor: palette.stone200,
          formatXLabel: (day) => `day ${Math.round(Number(day))}`,
          formatYLabel: (v) => `${Math.round(Number(v))}`,
        }}
      >
        {({ points, chartBounds, xScale }) => (
          <>
            <AreaRange upperPoints={points.hi} lowerPoints={points.lo} color={palette.moss100} connectMissingData curveType="natural" />
            <Line points={points.last} color={palette.bark500} strokeWidth={2} connectMissingData curveType="natural" opacity={0.7} />
            <Line points={points.fit} color={palette.moss700} strokeWidth={2.5} connectMissingData curveType="natural" />
            {data.events.map((event) => {
              const x = xScale(event.day);
              return <SkiaLine key={`${event.day}-${event.label}`} p1={vec(x, chartBounds.top)} p2={vec(x, chartBounds.bottom)} color={palette.amber700} strokeWidth={1.5} opacity={0.7} />;
            })}
            <Scatter points={points.measured} radius={5} color={palette.bark900} />
            {points.measured.map((p) =>
              p.y === null || p.y === undefined ? null : <Circle key={p.x} cx={p.x} cy={p.y} r={2} color={palette.white} />,
            )}
          </>
        )}
      </CartesianChart>
    </View>
  );
}
