import Head from 'expo-router/head';

/** The browser tab's title: "<page> · Proofyard". */
export function PageTitle({ title }: { title: string }) {
  return (
    <Head>
      <title>{`${title} · Proofyard`}</title>
    </Head>
  );
}
