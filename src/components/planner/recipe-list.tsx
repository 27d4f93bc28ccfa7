import { router } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { can } from '../../contracts/permissions';
import type { Recipe } from '../../contracts/recipes';
import type { Vessel } from '../../contracts/vessels';
import { fmt } from '../../format';
import { useRecipes } from '../../hooks/use-recipes';
import { useSession } from '../../hooks/use-session';
import { useVessels } from '../../hooks/use-vessels';
import { radius, space, touchTarget, useBreakpoint, useColors } from '../../theme';
import { Button, DataTable, EmptyState, ErrorState, Loader, Text, type Column } from '../ui';
import { RecipeForm } from './recipe-form';
import { VesselForm } from './vessel-form';

const VESSEL_COLUMNS: Column<Vessel>[] = [
  { key: 'name', label: 'Vessel', value: (v) => v.name, flex: 1.4 },
  { key: 'volume', label: 'Working volume', value: (v) => `${fmt(v.workingVolumeL / 1000, 1)} m³`, isNumeric: true },
  { key: 'range', label: 'Allowed range', value: (v) => `${fmt(v.minC, 0)}–${fmt(v.maxC, 0)} °C`, isNumeric: true },
  { key: 'rates', label: 'Heat / cool', value: (v) => `${fmt(v.maxHeatCPerH, 0)} / ${fmt(v.maxCoolCPerH, 0)} °C/h`, isNumeric: true },
  { key: 'hygienic', label: 'Hygienic minimum', value: (v) => `${fmt(v.hygienicMinC, 0)} °C`, isNumeric: true },
];

function RecipeCard({ recipe }: { recipe: Recipe }) {
  const c = useColors();
  return (
    <Pressable
      role="link"
      testID={`recipe-${recipe.id}`}
      onPress={() => router.push(`/planner/${recipe.id}`)}
      style={({ pressed }) => [styles.card, { backgroundColor: c.surface, borderColor: c.border }, pressed && { opacity: 0.85 }]}
    >
      <Text weight="semibold">{recipe.name}</Text>
      <Text variant="small" tone="muted">
        {recipe.vesselName} · {recipe.enzymeName} lot {recipe.lotCode}
      </Text>
      <Text variant="small">
        {fmt(recipe.batchH, 0)} h batch at {fmt(recipe.currentSetpointC)} °C now
        {recipe.releasedPlanId ? ` · released plan ${recipe.releasedPlanId}` : ''}
      </Text>
    </Pressable>
  );
}

/** The planner's front page: recipes to plan, and the vessels they are planned in. */
export function RecipeList() {
  const recipes = useRecipes();
  const vessels = useVessels();
  const { isWide } = useBreakpoint();
  const { session } = useSession();
  const canEdit = !!session && can(session.user.role, 'recipes.edit');
  // null: no form; 'new': adding; a vessel: changing it.
  const [editing, setEditing] = useState<Vessel | 'new' | null>(null);
  const [isAddingRecipe, setAddingRecipe] = useState(false);
  if (recipes.error) return <ErrorState error={recipes.error} onRetry={recipes.retry} />;
  if (recipes.isLoading || !recipes.data) return <Loader rows={3} label="Loading recipes" />;
  return (
    <>
      {recipes.data.recipes.length ? (
        <View style={[styles.grid, isWide && styles.gridWide]} testID="recipe-list">
          {recipes.data.recipes.map((r) => (
            <View key={r.id} style={isWide ? styles.cellWide : undefined}>
              <RecipeCard recipe={r} />
            </View>
          ))}
        </View>
      ) : (
        <EmptyState title="No recipes yet" message="A recipe ties an accepted enzyme lot to a vessel, a substrate charge and prices." />
      )}
      {canEdit ? (
        isAddingRecipe ? (
          <RecipeForm onDone={() => setAddingRecipe(false)} />
        ) : (
          <View style={styles.actions}>
            <Button label="Add a recipe" variant="secondary" onPress={() => setAddingRecipe(true)} testID="recipe-add" />
          </View>
        )
      ) : null}
      <Text variant="title" accessibilityRole="header">
        Vessels
      </Text>
      {vessels.error ? (
        <ErrorState error={vessels.error} onRetry={vessels.retry} />
      ) : !vessels.data ? (
        <Loader rows={2} label="Loading vessels" />
      ) : (
        <>
          <DataTable
            columns={VESSEL_COLUMNS}
            rows={vessels.data.vessels}
            rowKey={(v) => String(v.id)}
            caption="Vessels and their limits"
            testID="vessels-table"
          />
          {canEdit && !editing ? (
            <View style={styles.actions}>
              <Button label="Add a vessel" variant="secondary" onPress={() => setEditing('new')} testID="vessel-add" />
              {vessels.data.vessels.map((v) => (
                <Button key={v.id} label={`Change ${v.name}`} variant="ghost" onPress={() => setEditing(v)} testID={`vessel-edit-${v.id}`} />
              ))}
            </View>
          ) : null}
          {editing ? (
            <VesselForm key={editing === 'new' ? 'new' : editing.id} vessel={editing === 'new' ? null : editing} onDone={() => setEditing(null)} />
          ) : null}
        </>
      )}
    </>
  );
}

const styles = StyleSheet.create({
  grid: { gap: space.md },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap' },
  cellWide: { flexBasis: '31%', flexGrow: 1 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
  card: { borderWidth: 1, borderRadius: radius.lg, padding: space.lg, gap: space.xs, minHeight: touchTarget },
});
