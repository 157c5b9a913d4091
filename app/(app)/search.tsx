import { useLocalSearchParams } from 'expo-router';

import { SearchScreen } from '@/components/search/search-screen';
import { filtersFromParams } from '@/hooks/search';

export default function SearchRoute() {
  const params = useLocalSearchParams<Record<string, string>>();
  const entry = typeof params.entry === 'string' ? params.entry : undefined;
  return <SearchScreen q={typeof params.q === 'string' ? params.q : ''} filters={filtersFromParams(params)} entryId={entry} />;
}
