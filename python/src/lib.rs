//! recoup's Python module `recoup._native` (PyO3): the thin native layer
//! under the `recoup` package (python/pysrc/recoup). It exposes the
//! library API (`recoup::api`) as it is: symbol values by doubled
//! arguments (whole NumPy arrays at once, with the GIL released and the
//! rows spread over all cores), expressions that parse, simplify, check,
//! evaluate and recouple, and reports as their serde JSON, which the
//! Python layer turns into objects with attributes. Errors become the
//! package's exception classes (recoup.errors) with the position of a
//! parse error.

use numpy::{IntoPyArray, PyArrayDyn, PyArrayMethods, PyReadonlyArray1};
use pyo3::prelude::*;
use rayon::prelude::*;
use recoup::api::{self, symbols, Declarations, Expression, Name, Parity, Q};

/// Rows of an argument array below this are evaluated on the calling
/// thread (spreading them over threads costs more than it saves).
const PARALLEL_FROM_ROWS: usize = 2048;

/// An exact value for Python: its text (None for a float only), its
/// float and its parts `(coefficient, radicand)`.
type ValueParts = (Option<String>, f64, Vec<(String, String)>);

/// A library error as the package's exception (`recoup.errors`).
fn to_py(e: api::Error) -> PyErr {
    Python::with_gil(|py| {
        let class = match e {
            api::Error::Parse(_) => "ParseError",
            api::Error::Input(_) => "InputError",
            api::Error::Limit(_) => "LimitError",
            api::Error::Internal(_) => "InternalError",
        };
        let (line, column) = e.position().unzip();
        let made = py
            .import("recoup.errors")
            .and_then(|m| m.getattr(class))
            .and_then(|c| c.call1((e.to_string(), line, column)));
        match made {
            Ok(v) => PyErr::from_value(v),
            Err(err) => err,
        }
    })
}

fn json<T: serde::Serialize>(v: &T) -> PyResult<String> {
    serde_json::to_string(v).map_err(|e| to_py(api::Error::Internal(e.to_string())))
}

/// The number of doubled arguments of a symbol kind.
fn width(kind: &str) -> Option<usize> {
    match kind {
        "3j" | "cg" | "6j" => Some(6),
        "9j" => Some(9),
        _ => None,
    }
}

/// One float symbol from its doubled arguments.
fn float_one(kind: &str, a: &[i64]) -> Result<f64, api::Error> {
    match kind {
        "3j" => symbols::float_3j([a[0], a[1], a[2]], [a[3], a[4], a[5]]),
        "cg" => symbols::float_cg(a.try_into().expect("six arguments")),
        "6j" => symbols::float_6j(a.try_into().expect("six arguments")),
        _ => symbols::float_9j(a.try_into().expect("nine arguments")),
    }
}

/// One exact symbol from its doubled arguments.
fn exact_one(kind: &str, a: &[i64]) -> Result<recoup::api::Surd, api::Error> {
    match kind {
        "3j" => symbols::exact_3j([a[0], a[1], a[2]], [a[3], a[4], a[5]]),
        "cg" => symbols::exact_cg(a.try_into().expect("six arguments")),
        "6j" => symbols::exact_6j(a.try_into().expect("six arguments")),
        _ => symbols::exact_9j(a.try_into().expect("nine arguments")),
    }
}

fn kind_width(kind: &str, given: usize) -> PyResult<usize> {
    let k = width(kind).ok_or_else(|| {
        to_py(api::Error::Input(format!(
            "unknown symbol kind {kind:?} (3j, cg, 6j or 9j)"
        )))
    })?;
    if given != k {
        return Err(to_py(api::Error::Input(format!(
            "a {kind} takes {k} arguments; got {given}"
        ))));
    }
    Ok(k)
}

/// Float values of many symbols of one kind, over an array of `shape`:
/// `columns` holds one contiguous array per argument (doubled) with an
/// element for every entry of `shape` in C order, or a single element that
/// holds for all of them (the Python layer broadcasts). The GIL is
/// released and large arrays are spread over all cores; the first bad
/// entry (in order) is the error, with its flat index.
#[pyfunction]
fn float_symbols<'py>(
    py: Python<'py>,
    kind: &str,
    shape: Vec<usize>,
    columns: Vec<PyReadonlyArray1<'py, i64>>,
) -> PyResult<Bound<'py, PyArrayDyn<f64>>> {
    let k = kind_width(kind, columns.len())?;
    let n = shape
        .iter()
        .try_fold(1usize, |a, &b| a.checked_mul(b))
        .ok_or_else(|| to_py(api::Error::Limit("the array is too large".into())))?;
    let slices: Vec<&[i64]> = columns
        .iter()
        .map(|c| c.as_slice())
        .collect::<Result<_, _>>()
        .map_err(|_| to_py(api::Error::Internal("a column is not contiguous".into())))?;
    if slices.iter().any(|c| c.len() != n && c.len() != 1) {
        return Err(to_py(api::Error::Input(
            "each argument must have one element per entry, or a single one".into(),
        )));
    }
    let values = py.allow_threads(|| -> Result<Vec<f64>, (usize, api::Error)> {
        let one = |i: usize| {
            let mut row = [0i64; 9];
            for (r, col) in row.iter_mut().zip(&slices) {
                *r = if col.len() == 1 { col[0] } else { col[i] };
            }
            float_one(kind, &row[..k]).map_err(|e| (i, e))
        };
        if n < PARALLEL_FROM_ROWS {
            (0..n).map(one).collect()
        } else {
            (0..n).into_par_iter().map(one).collect()
        }
    });
    match values {
        Ok(v) => Ok(v.into_pyarray(py).reshape(shape)?),
        Err((i, e)) => Err(to_py(match e {
            api::Error::Input(m) => api::Error::Input(format!("element {i}: {m}")),
            api::Error::Limit(m) => api::Error::Limit(format!("element {i}: {m}")),
            other => other,
        })),
    }
}

/// One exact symbol: its text, its float and its parts `(coefficient,
/// radicand)`.
#[pyfunction]
fn exact_symbol(py: Python<'_>, kind: &str, args: Vec<i64>) -> PyResult<ValueParts> {
    kind_width(kind, args.len())?;
    let kind = kind.to_string();
    let v = py
        .allow_threads(move || exact_one(&kind, &args))
        .map_err(to_py)?;
    let value = api::Value::exact(&v);
    Ok((value.exact, value.float, value.parts))
}

fn declarations(integer: Vec<String>, half_odd: Vec<String>) -> PyResult<Declarations> {
    let mut d = Declarations::new();
    for (names, parity) in [(integer, Parity::Integer), (half_odd, Parity::HalfOdd)] {
        for n in names {
            if !api::is_name(&n) {
                return Err(to_py(api::Error::Input(format!(
                    "{n:?} is not a variable name (letters, digits, _, trailing primes)"
                ))));
            }
            d.declare(Name::new(n), parity)
                .map_err(|c| to_py(c.into()))?;
        }
    }
    Ok(d)
}

fn rational(what: &str, s: &str) -> PyResult<Q> {
    api::parse_rational(s).ok_or_else(|| {
        to_py(api::Error::Input(format!(
            "{what} must be an integer or a fraction like 3/2; got {s:?}"
        )))
    })
}

/// An expression of the language with its declarations.
#[pyclass(name = "NativeExpression", module = "recoup._native", frozen)]
struct NativeExpression {
    inner: Expression,
}

#[pymethods]
impl NativeExpression {
    #[new]
    #[pyo3(signature = (text, integer = Vec::new(), half_odd = Vec::new()))]
    fn new(text: &str, integer: Vec<String>, half_odd: Vec<String>) -> PyResult<Self> {
        let d = declarations(integer, half_odd)?;
        let inner = Expression::parse_with(text, &d).map_err(to_py)?;
        Ok(NativeExpression { inner })
    }

    /// The text as written.
    fn text(&self) -> String {
        self.inner.text().to_string()
    }

    /// The normal form in the language.
    fn normal(&self) -> String {
        self.inner.to_string()
    }

    /// LaTeX.
    fn latex(&self) -> String {
        self.inner.latex()
    }

    /// The free variables.
    fn free(&self) -> Vec<String> {
        self.inner.free_variables()
    }

    /// The declarations in the language, if any.
    fn declared(&self) -> Option<String> {
        self.inner.declared_text()
    }

    /// The structure, term by term, as JSON.
    fn shape(&self) -> PyResult<String> {
        json(&api::report::shape(self.inner.expr()))
    }

    /// The simplification report (JSON) and its result.
    fn simplify(
        &self,
        py: Python<'_>,
        regge: bool,
        samples: usize,
        max_j: &str,
        canonical: bool,
        time_limit: Option<f64>,
    ) -> PyResult<(String, NativeExpression)> {
        let settings = api::SimplifySettings {
            regge,
            samples,
            max_j: rational("max_j", max_j)?,
            canonical,
        };
        let e = self.inner.clone();
        let s = py
            .allow_threads(move || api::within_seconds(time_limit, || e.simplify(&settings)))
            .map_err(to_py)?;
        let result = self.inner.derived(s.result_expr.clone());
        Ok((json(&s)?, NativeExpression { inner: result }))
    }

    /// The check report of `self = other` (JSON).
    #[allow(clippy::too_many_arguments)]
    fn check(
        &self,
        py: Python<'_>,
        other: &NativeExpression,
        max_j: &str,
        samples: usize,
        exhaustive: bool,
        max_points: u64,
        triangles_hold: bool,
        seed: u64,
        time_limit: Option<f64>,
    ) -> PyResult<String> {
        let settings = api::CheckSettings {
            max_j: rational("max_j", max_j)?,
            samples,
            exhaustive,
            max_points,
            triangles_hold,
            seed,
        };
        let (l, r) = (self.inner.clone(), other.inner.clone());
        let report = py
            .allow_threads(move || api::within_seconds(time_limit, || l.check(&r, &settings)))
            .map_err(to_py)?;
        json(&report)
    }

    /// The value at `at` (name, value text): exact text (None with
    /// `float_only`), float, and the exact parts.
    fn evaluate(
        &self,
        py: Python<'_>,
        at: Vec<(String, String)>,
        float_only: bool,
        time_limit: Option<f64>,
    ) -> PyResult<ValueParts> {
        let mut point = recoup::api::Assignment::new();
        for (k, v) in at {
            if !api::is_name(&k) {
                return Err(to_py(api::Error::Input(format!(
                    "{k:?} is not a variable name"
                ))));
            }
            let q = rational(&format!("the value of {k}"), &v)?;
            point.insert(Name::new(k), q);
        }
        let e = self.inner.clone();
        let v = py
            .allow_threads(move || {
                api::within_seconds(time_limit, || {
                    if float_only {
                        e.evaluate_float(&point).map(api::Value::float)
                    } else {
                        e.evaluate(&point)
                    }
                })
            })
            .map_err(to_py)?;
        Ok((v.exact, v.float, v.parts))
    }
}

/// The recoupling coefficient between two coupling schemes: the report
/// (JSON) and the coefficient.
#[pyfunction]
fn recouple(
    py: Python<'_>,
    first: &str,
    second: &str,
    only_6j: bool,
    time_limit: Option<f64>,
) -> PyResult<(String, NativeExpression)> {
    let form = if only_6j {
        api::RecouplingForm::SixJOnly
    } else {
        api::RecouplingForm::Symbols
    };
    let (a, b) = (first.to_string(), second.to_string());
    let r = py
        .allow_threads(move || api::within_seconds(time_limit, || api::recouple(&a, &b, form)))
        .map_err(to_py)?;
    let result = Expression::parse(&r.result).map_err(to_py)?;
    Ok((json(&r)?, NativeExpression { inner: result }))
}

/// The module.
#[pymodule]
fn _native(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(float_symbols, m)?)?;
    m.add_function(wrap_pyfunction!(exact_symbol, m)?)?;
    m.add_function(wrap_pyfunction!(recouple, m)?)?;
    m.add_class::<NativeExpression>()?;
    m.add("MAX_FLOAT_DOUBLED", symbols::MAX_FLOAT_DOUBLED)?;
    m.add("MAX_EXACT_DOUBLED", symbols::MAX_EXACT_DOUBLED)?;
    Ok(())
}
