declare module 'ml-naivebayes';
