# Peer: an analyst in Python with pandas. Reads the bookings from a CSV file exported by DuckDB
# (the read is timed on its own), then computes the plan's numbers from the rows, with the same
# keys as bench/numbers.ts. Run by bench/run.ts:
#   python3 peer_pandas.py BOOKINGS.csv WINDOWS.json RESULT.json
import json
import resource
import sys
import time

import pandas as pd

ALL = "(all)"
MISSING = "(missing)"


def month_key(k):
    return f"{k // 100}-{k % 100:02d}"


def flag(b):
    return "true" if bool(b) else "false"


def main():
    csv_path, windows_path, result_path = sys.argv[1:4]
    with open(windows_path) as f:
        w = json.load(f)
    ts = pd.Timestamp

    started = time.perf_counter()
    df = pd.read_csv(
        csv_path,
        usecols=["sail_date", "route", "channel", "pass_holder", "customer_id", "fare_total", "passengers", "refund_amount"],
        dtype={"route": "category", "channel": "category", "customer_id": "object", "fare_total": "float64", "passengers": "float64", "refund_amount": "float64"},
        parse_dates=["sail_date"],
    )
    read = time.perf_counter()

    out = {}
    d = df["sail_date"]

    # Monthly totals, and from them the monthly ratios of the complete months.
    scoped = df[(d >= ts(w["all"][0])) & (d < ts(w["all"][1]))]
    sd = scoped["sail_date"]
    month = sd.dt.year * 100 + sd.dt.month
    monthly = scoped.groupby(month).agg(
        revenue=("fare_total", "sum"), rows=("fare_total", "size"), pax=("passengers", "sum"), refund=("refund_amount", "sum")
    )
    hist_to = ts(w["history"][1])
    hist_key = hist_to.year * 100 + hist_to.month
    for k, r in monthly.iterrows():
        m = month_key(int(k))
        out[f"month:{m}:revenue"] = float(r["revenue"])
        out[f"month:{m}:rows"] = float(r["rows"])
        if int(k) < hist_key:
            out[f"fpp:{m}"] = float(r["revenue"] / r["pax"])
            out[f"refshare:{m}"] = float(r["refund"] / r["revenue"])

    # Years, and each year up to the day-of-year of the data's last day.
    last = sd.max()
    last_md = last.month * 100 + last.day
    md = sd.dt.month * 100 + sd.dt.day
    year = sd.dt.year
    for y, v in scoped.groupby(year)["fare_total"].sum().items():
        out[f"year:{int(y)}:revenue"] = float(v)
    for y, v in scoped[md <= last_md].groupby(year[md <= last_md])["fare_total"].sum().items():
        out[f"ytd:{int(y)}:revenue"] = float(v)

    # The two summers by route and by channel.
    for name, window in (("current", w["summer"]), ("prior", w["summerBefore"])):
        summer = df[(d >= ts(window[0])) & (d < ts(window[1]))]
        for column in ("route", "channel"):
            g = summer.groupby(column, observed=True)["fare_total"].agg(["sum", "size"])
            for seg, r in g.iterrows():
                out[f"summer:{name}:{seg}:revenue"] = float(r["sum"])
                out[f"summer:{name}:{seg}:rows"] = float(r["size"])
            # A missing value is its own segment (groupby drops it for categorical columns).
            missing = summer[summer[column].isna()]
            if len(missing) > 0:
                out[f"summer:{name}:{MISSING}:revenue"] = float(missing["fare_total"].sum())
                out[f"summer:{name}:{MISSING}:rows"] = float(len(missing))
        out[f"summer:{name}:{ALL}:revenue"] = float(summer["fare_total"].sum())
        out[f"summer:{name}:{ALL}:rows"] = float(len(summer))

    # Bookings per customer since the launch: a customer is a pass holder if any booking was.
    since = df[(d >= ts(w["sinceLaunch"][0])) & (d < ts(w["sinceLaunch"][1]))]
    units = since[since["customer_id"].notna()]
    per_customer = units.assign(member=units["pass_holder"].eq(True)).groupby("customer_id").agg(
        flag=("member", "max"), value=("member", "size")
    )
    for member, g in per_customer.groupby("flag"):
        v = g["value"].astype("float64")
        stats = {
            "n": float(len(v)),
            "mean": float(v.mean()),
            "var": float(v.var(ddof=1)),
            "median": float(v.quantile(0.5)),
            "p90": float(v.quantile(0.9)),
            "total": float(v.sum()),
        }
        for i, (lo, hi) in enumerate(w["buckets"]):
            stats[f"b{i}"] = float(((v >= lo) & (v <= hi)).sum() if hi is not None else (v >= lo).sum())
        for k, value in stats.items():
            out[f"freq:{flag(member)}:{k}"] = value

    # Bookings by month and pass holding; since the launch by route and pass holding.
    known = scoped[scoped["pass_holder"].notna()]
    kd = known["sail_date"]
    for (m, p), n in known.groupby([kd.dt.year * 100 + kd.dt.month, known["pass_holder"]]).size().items():
        out[f"monthpass:{month_key(int(m))}:{flag(p)}"] = float(n)
    launch = since[since["pass_holder"].notna()]
    for (route, p), n in launch.groupby(["route", "pass_holder"], observed=True).size().items():
        out[f"launch:{route}:{flag(p)}"] = float(n)
    for p, n in launch.groupby("pass_holder").size().items():
        out[f"launch:{ALL}:{flag(p)}"] = float(n)
    done = time.perf_counter()

    result = {
        "readMs": (read - started) * 1000,
        "computeMs": (done - read) * 1000,
        "totalMs": (done - started) * 1000,
        "rows": int(len(df)),
        "numbers": out,
        "maxRssKb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,
        "pandas": pd.__version__,
    }
    with open(result_path, "w") as f:
        json.dump(result, f)


if __name__ == "__main__":
    main()
