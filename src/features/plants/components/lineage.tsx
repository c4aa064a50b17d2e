import { Link } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/card';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { plantDisplayName } from '@/shared/plant-name';
import type { PlantDetail, PlantRef } from '@/shared/schemas/records';
import { spacing } from '@/theme';

function PlantLink({ plant }: { plant: PlantRef }) {
  return (
    <Link href={`/plants/${plant.id}`}>
      <Text color="accent" variant="bodyStrong">
        {plant.tag} · {plantDisplayName(plant)}
      </Text>
    </Link>
  );
}

/** Parent, siblings and children of a division family. */
export function Lineage({ plant }: { plant: PlantDetail }) {
  const { parent, siblings, children } = plant.lineage;
  if (!parent && children.length === 0) return null;
  return (
    <Card title="Lineage" testID="lineage">
      {parent ? (
        <View style={styles.group}>
          <Text variant="label" color="textMuted">
            Divided from, on {formatDate(plant.dividedOn)}
          </Text>
          <PlantLink plant={parent} />
        </View>
      ) : null}
      {siblings.length > 0 ? (
        <View style={styles.group}>
          <Text variant="label" color="textMuted">
            Other pieces of the same division
          </Text>
          {siblings.map((p) => (
            <PlantLink key={p.id} plant={p} />
          ))}
        </View>
      ) : null}
      {children.length > 0 ? (
        <View style={styles.group}>
          <Text variant="label" color="textMuted">
            Divisions taken from this plant
          </Text>
          {children.map((p) => (
            <PlantLink key={p.id} plant={p} />
          ))}
        </View>
      ) : null}
      <Link href={`/plants/compare?by=family&plantId=${plant.id}`} testID="compare-family">
        <Text color="accent" variant="bodyStrong">
          Compare the family side by side ›
        </Text>
      </Link>
    </Card>
  );
}

const styles = StyleSheet.create({ group: { gap: spacing.xs } });
