export { Button } from './button';
export { Card } from './card';
export { Field } from './field';
export { Screen } from './screen';
export { EmptyState, ErrorState, Loader } from './states';
export { DataTable, type Column } from './table';
export { Text } from './text';
