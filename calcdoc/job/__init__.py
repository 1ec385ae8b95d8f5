"""The job layer: the job file read once into one typed, frozen model (:class:`Job`), with every problem
located at file:line:column. Nothing after this layer sees YAML."""
from .jobfile import CLOSED_PROCESSES, FLOW_PROCESSES, SCHEMA_VERSION, load, loads
from .model import (
                    Drop,
                    FollowSpec,
                    GasSpec,
                    Input,
                    Job,
                    LegOptions,
                    LegSpec,
                    LimitSpec,
                    Site,
                    Staging,
                    StartSpec,
                    SweepSpec,
                    TitleBlock,
)

__all__ = ["CLOSED_PROCESSES", "FLOW_PROCESSES", "SCHEMA_VERSION", "Drop", "FollowSpec", "GasSpec", "Input", "Job",
           "LegOptions", "LegSpec", "LimitSpec", "Site", "Staging", "StartSpec", "SweepSpec", "TitleBlock", "load",
           "loads"]
