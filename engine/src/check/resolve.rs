//! Order-independent resolution: definitions form a dependency graph; strongly connected
//! components (Tarjan's algorithm, written without recursion so that a chain of ten thousand
//! `let`s cannot exhaust the stack) give both the evaluation order and every cycle.

/// The evaluation order (dependencies first) and the cycles, each as its member list.
pub struct Order {
    pub order: Vec<usize>,
    pub cycles: Vec<Vec<usize>>,
}

/// `deps[i]` lists the definitions that definition `i` uses.
pub fn order(deps: &[Vec<usize>]) -> Order {
    let n = deps.len();
    const UNSEEN: usize = usize::MAX;
    let mut index = vec![UNSEEN; n];
    let mut low = vec![0; n];
    let mut on_stack = vec![false; n];
    let mut stack = Vec::new();
    let mut next_index = 0;
    let mut order = Vec::with_capacity(n);
    let mut cycles = Vec::new();
    // Explicit call stack: (node, position in its dependency list).
    let mut calls: Vec<(usize, usize)> = Vec::new();
    for root in 0..n {
        if index[root] != UNSEEN {
            continue;
        }
        calls.push((root, 0));
        index[root] = next_index;
        low[root] = next_index;
        next_index += 1;
        stack.push(root);
        on_stack[root] = true;
        while let Some(&mut (v, ref mut pos)) = calls.last_mut() {
            if let Some(&w) = deps[v].get(*pos) {
                *pos += 1;
                if index[w] == UNSEEN {
                    index[w] = next_index;
                    low[w] = next_index;
                    next_index += 1;
                    stack.push(w);
                    on_stack[w] = true;
                    calls.push((w, 0));
                } else if on_stack[w] {
                    low[v] = low[v].min(index[w]);
                }
                continue;
            }
            calls.pop();
            if let Some(&(parent, _)) = calls.last() {
                low[parent] = low[parent].min(low[v]);
            }
            if low[v] == index[v] {
                let mut component = Vec::new();
                while let Some(w) = stack.pop() {
                    on_stack[w] = false;
                    component.push(w);
                    if w == v {
                        break;
                    }
                }
                component.sort_unstable();
                let cyclic = component.len() > 1 || deps[v].contains(&v);
                if cyclic {
                    cycles.push(component);
                } else {
                    order.push(v);
                }
            }
        }
    }
    Order { order, cycles }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn dependencies_first_and_cycles_found() {
        // 0 uses 1, 1 uses 2; 3 <-> 4; 5 uses itself.
        let deps = vec![vec![1], vec![2], vec![], vec![4], vec![3], vec![5]];
        let o = order(&deps);
        assert_eq!(o.order, vec![2, 1, 0]);
        assert_eq!(o.cycles, vec![vec![3, 4], vec![5]]);
    }

    #[test]
    fn long_chain_without_recursion() {
        let n = 200_000;
        let deps: Vec<Vec<usize>> = (0..n)
            .map(|i| if i + 1 < n { vec![i + 1] } else { vec![] })
            .collect();
        let o = order(&deps);
        assert_eq!(o.order.len(), n);
        assert_eq!(o.order[0], n - 1);
        assert!(o.cycles.is_empty());
    }
}
