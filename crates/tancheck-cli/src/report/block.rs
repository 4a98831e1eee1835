//! The body of a block report's JSON document ([`BlockDocument`], kind `block`), written by
//! the JSON reporter and described by the report schema.

use schemars::JsonSchema;
use serde::Serialize;
use tancheck_core::block::BlockReport;

/// The body of a block report's JSON document (kind `block`): the report with its verdict.
#[derive(Clone, Debug, Serialize, JsonSchema)]
pub struct BlockDocument {
    /// Always "block": the routine has the block interface.
    pub interface: String,
    pub passed: bool,
    /// The first finding's name, or "none".
    pub finding: String,
    /// 0 pass, 1 a finding, 3 a call failed or crashed.
    pub exit_code: i32,
    #[serde(flatten)]
    pub report: BlockReport,
    /// What the checks do not show (`tancheck_core::block::BLOCK_CAUTIONS`).
    pub cautions: Vec<String>,
}

impl BlockDocument {
    pub fn of(r: &BlockReport) -> BlockDocument {
        BlockDocument {
            interface: "block".into(),
            passed: r.passed(),
            finding: r.finding().into(),
            exit_code: r.exit_code(),
            report: r.clone(),
            cautions: tancheck_core::block::BLOCK_CAUTIONS.map(String::from).to_vec(),
        }
    }
}
