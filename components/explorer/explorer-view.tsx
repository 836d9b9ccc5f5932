"use client";
import { useCallback } from "react";
import { useExplorerEstimates } from "@/lib/hooks/use-explorer";
import { useExplorerUrl } from "@/lib/hooks/use-explorer-url";
import { Card } from "@/components/ui/card";
import { ExplorerFilters } from "./explorer-filters";
import { ExplorerTable } from "./estimates-table";
import { PlotPanel } from "./plot-panel";
import { ExportLinks } from "./export-links";
import { SaveView } from "./save-view";
import { AddToManuscript } from "@/components/manuscripts/add-to-manuscript";
import { EmptyExplorer } from "./empty-explorer";
import { choicesFor, effectiveSampler, type ExplorerOptions } from "./explorer-options";

const FILTER_KEYS = ["sampler", "ensemble", "tag", "owner", "observable", "scope"];

/** The explorer: filters and the table and plot they drive, all from the URL. */
export function ExplorerView({ options }: { options: ExplorerOptions }) {
  const url = useExplorerUrl();
  const { get, set, ranges, setRanges, tableQuery, plotQuery } = url;
  const { data, error, isPending, isFetching } = useExplorerEstimates(tableQuery);
  // one ensemble chosen: only its sampler's parameters get columns and x-axis choices
  const { params } = choicesFor(options, effectiveSampler(options, get("sampler"), get("ensemble")));
  const filtered = FILTER_KEYS.some((k) => get(k)) || ranges.length > 0;
  const clear = useCallback(() => { set(Object.fromEntries(FILTER_KEYS.map((k) => [k, null]))); setRanges([]); }, [set, setRanges]);
  if (data && data.total === 0 && !filtered) return <EmptyExplorer />;
  const plot = get("observable") ? { x: get("x") || params[0] || "", groupBy: get("groupBy") || "ensemble", logX: get("logX") === "1", logY: get("logY") === "1" } : null;
  return (
    <div className="space-y-4">
      <ExplorerFilters get={get} set={set} ranges={ranges} setRanges={setRanges} options={options} busy={isFetching} />
      {error ? <p role="alert" className="text-sm text-danger">Could not load the estimates: {error.message}. Fix the filter it names, or clear the filters.</p> : null}
      <PlotPanel get={get} set={set} params={params} plotQuery={plotQuery} />
      <Card title="Estimates">
        <ExplorerTable data={data} params={params} get={get} set={set} isPending={isPending} onClear={clear}
          toolbar={<>
            <SaveView query={data?.query} plot={plot} />
            <AddToManuscript query={data?.query} plot={plot} />
            <span className="mx-2 h-5 border-l border-line" aria-hidden />
            <ExportLinks base="/api/v1/estimates" query={tableQuery} what="table" testId="table-export" />
          </>} />
      </Card>
    </div>
  );
}
