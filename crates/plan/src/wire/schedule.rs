//! The schedule as CSV a controller can run, with the cautions as comment lines.

use crate::model::Plan;
use traycast_thermal::safety::CAUTIONS;
use traycast_thermal::schedule::Schedule;

/// The schedule as CSV a controller can run: step, configuration, start and duration in seconds,
/// preceded by the usual cautions as comment lines.
pub fn schedule_csv(plan: &Plan, schedule: &Schedule) -> String {
    let mut out = format!(
        "# Traycast schedule for '{}'\n",
        plan.name.replace(['\n', '\r'], " ")
    );
    for c in CAUTIONS {
        out.push_str(&format!("# {c}\n"));
    }
    out.push_str("step,configuration,start_s,duration_s\n");
    let mut t = 0.0;
    for (k, s) in schedule.steps.iter().enumerate() {
        out.push_str(&format!(
            "{},{},{:.3},{:.3}\n",
            k + 1,
            s.config,
            t,
            s.seconds
        ));
        t += s.seconds;
    }
    out
}
