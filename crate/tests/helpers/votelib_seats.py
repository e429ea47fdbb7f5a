"""Seats by votelib (a general-purpose voting library from the Python package index)
for the cases on standard input, one JSON list of cases:
[{"rule": "dhondt" | "sainte_lague" | "hare", "seats": n, "votes": [...], "threshold": pct}]
Prints one JSON list: per case the seats per party, or null when votelib reports a tie.
Parties under the threshold (percent of all the votes, exactly at it stays in) are left
out before votelib shares the seats, as the Hare quota counts only the parties in.
"""

import json
import sys
from fractions import Fraction

from votelib.evaluate.core import Tie
from votelib.evaluate.proportional import HighestAverages, LargestRemainder

EVALUATORS = {
    "dhondt": HighestAverages("d_hondt"),
    "sainte_lague": HighestAverages("sainte_lague"),
    "hare": LargestRemainder("hare"),
}


def seats(case):
    votes = case["votes"]
    total = sum(votes)
    bar = Fraction(case["threshold"]).limit_denominator(10**6) * total / 100
    counted = {k: v for k, v in enumerate(votes) if v > 0 and v >= bar}
    if not counted:
        return [0] * len(votes)
    result = EVALUATORS[case["rule"]].evaluate(counted, case["seats"])
    if any(isinstance(k, Tie) for k in result):
        return None
    return [int(result.get(k, 0)) for k in range(len(votes))]


def main():
    cases = json.load(sys.stdin)
    json.dump([seats(c) for c in cases], sys.stdout)


if __name__ == "__main__":
    main()
